import { spawn, spawnSync } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import {
  chmodSync,
  cpSync,
  existsSync,
  mkdirSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import pino from 'pino'
import { createApp } from '../../server/app'
import { testConfig } from '../../server/config'
import { fixedClock } from '../../server/clock'
import { createKnex, migrationsDir } from '../../server/db/knex'
import { prepareDatabase } from '../../server/db/prepare'
import { mediaFolders, writeOriginal } from '../../server/clips/storage'
import { createBackup } from '../../server/backup/backup'
import { restoreBackup } from '../../server/backup/restore'
import { hashFile } from '../../server/backup/files'
import { BackupError, type BackupManifest } from '../../server/backup/manifest'
import { fakeMailer, signInAs, type Agent, type TestApp } from './helpers'
import { addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'
import { answerFor, giveAudio, invitedOf, passHeadphoneCheck } from './playerFixtures'

const KEYS = ['brightness', 'bow_response', 'warmth']
const PROJECT = new URL('../..', import.meta.url).pathname
const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
const root = mkdtempSync(join(tmpdir(), 'ringdown-backup-'))
const live = {
  databaseFile: join(root, 'live/data/ringdown.sqlite'),
  mediaDir: join(root, 'live/media'),
}

/** An app on a database file, started the way the server starts: migrations, then seeds. */
async function fileApp(databaseFile: string, mediaDir: string): Promise<TestApp> {
  const knex = createKnex(databaseFile)
  await prepareDatabase(knex)
  const mailer = fakeMailer()
  const config = testConfig({ databaseFile, mediaDir })
  const app = createApp({ knex, config, mailer, clock, logger: pino({ level: 'silent' }) })
  const settle = () => app.locals.ctx.outbox.settle()
  return {
    app,
    knex,
    mailer,
    config,
    settle,
    close: async () => {
      await settle()
      await knex.destroy()
    },
  }
}

let t: TestApp
let developer: Agent
let sessionId: number
/** Every answer the players will give, spread over players so each save lands somewhere new. */
const jobs: { token: string; index: number; answer: unknown }[] = []
let next = 0
let baseline = 0
/** The live server's findings whenever the database held this many answers. */
const findingsAt = new Map<number, unknown>()
/** What was saved while each backup ran, printed at the end. */
const figures: string[] = []

const findingsOf = async (agent: Agent) => {
  const res = await agent.get(`/api/findings/${sessionId}`)
  expect(res.status).toBe(200)
  return res.body as unknown
}
const answerCount = async (knex: TestApp['knex']) =>
  Number(((await knex('answers').count({ n: '*' }).first()) as { n: number }).n)

beforeAll(async () => {
  t = await fileApp(live.databaseFile, live.mediaDir)
  developer = await signInAs(t.app, 'developer')
  const { recipeIds, clipSets } = await studyFixture(t.knex, 3, 2, 'Kept')
  await giveAudio(
    t.knex,
    live.mediaDir,
    clipSets.flatMap((s) => s.clipIds),
  )
  const folders = mediaFolders(live.mediaDir)
  for (let i = 0; i < 2; i++) await writeOriginal(folders, randomBytes(4096 + i), 'wav')
  mkdirSync(folders.incoming, { recursive: true })
  writeFileSync(join(folders.incoming, 'upload-in-flight.part'), 'half an upload')
  ;({ id: sessionId } = await openStudy(developer, {
    name: 'Winter bow-response panel',
    format: 'rating',
    recipeIds,
    clipSets,
    duplicates: 1,
    deadline: isoDay(clock.now(), 7),
  }))
  const playerIds = await addPlayers(t.knex, 60)
  await developer.post(`/api/sessions/${sessionId}/invitations`).send({ playerIds })
  await t.settle()
  const plans = []
  for (const p of await invitedOf(t, sessionId)) {
    await request(t.app).post('/api/player/consent').send({ token: p.token }).expect(200)
    await passHeadphoneCheck(t.app, p.token)
    const plan = (await request(t.app).get('/api/player/plan').set('X-Invitation-Token', p.token))
      .body.plan
    plans.push({ token: p.token, trials: plan.trials })
  }
  const trialsEach = plans[0].trials.length
  for (let k = 0; k < trialsEach; k++)
    for (const [i, p] of plans.entries())
      jobs.push({ token: p.token, index: k, answer: answerFor(p.trials[k], KEYS, 7 * i + k) })
  baseline = await answerCount(t.knex)
  findingsAt.set(baseline, await findingsOf(developer))
}, 60_000)

afterAll(async () => {
  if (figures.length) console.info(figures.join('\n'))
  await t.close()
  rmSync(root, { recursive: true, force: true })
})

/**
 * Players saving answers one after another until `stop`, as the player pages do. After each save
 * the findings are read, so the live server's findings are known for every count of answers.
 */
function saveAnswersUntil(stop: () => boolean) {
  /** When each save was answered, and how many answers the database held after it. */
  const saved: { at: number; count: number }[] = []
  const done = (async () => {
    while (!stop() && next < jobs.length) {
      const job = jobs[next++]
      const res = await request(t.app)
        .put(`/api/player/answers/${job.index}`)
        .send({ token: job.token, answer: job.answer })
      if (res.status !== 200 || res.body.duplicate !== false)
        throw new Error(`save answered ${res.status} ${JSON.stringify(res.body)}`)
      saved.push({ at: performance.now(), count: baseline + next })
      findingsAt.set(baseline + next, await findingsOf(developer))
    }
  })()
  return { saved, done }
}

async function until(condition: () => boolean) {
  for (let i = 0; i < 500 && !condition(); i++) await new Promise((r) => setTimeout(r, 10))
}

/** A backup taken while answers are being saved, and the figures of what was saved meanwhile. */
async function backupUnderLoad(label: string, backup: () => Promise<BackupManifest>) {
  let stop = false
  const load = saveAnswersUntil(() => stop)
  await until(() => load.saved.length >= 3)
  const started = performance.now()
  let manifest: BackupManifest
  try {
    manifest = await backup()
  } finally {
    stop = true
    await load.done
  }
  const ended = performance.now()
  const during = load.saved.filter((s) => s.at > started && s.at < ended)
  const inBackup = manifest.tables.answers
  figures.push(
    `${label}: ${during.length} answers saved while the ${Math.round(ended - started)} ms backup ` +
      `ran, ${during.filter((s) => s.count <= inBackup).length} of them before its snapshot; ` +
      `${inBackup} answers in the backup, ${next} saved in all by the end`,
  )
  return { manifest, during: during.length }
}

/** Runs a backup script on `place` as DATABASE_FILE and MEDIA_DIR; `direct` skips npm. */
function run(
  args: string[],
  place: { databaseFile: string; mediaDir: string },
  options: { uid?: number; gid?: number; direct?: boolean } = {},
) {
  const [command, argv] = options.direct
    ? [process.execPath, ['--import', 'tsx', `scripts/${args[0]}.ts`, ...args.slice(1)]]
    : ['npm', ['run', '--silent', args[0], '--', ...args.slice(1)]]
  const child = spawn(command, argv, {
    cwd: PROJECT,
    env: {
      ...process.env,
      DATABASE_FILE: place.databaseFile,
      MEDIA_DIR: place.mediaDir,
      INIT_CWD: PROJECT,
    },
    uid: options.uid,
    gid: options.gid,
  })
  let stdout = ''
  let stderr = ''
  child.stdout.on('data', (c: Buffer) => (stdout += c.toString()))
  child.stderr.on('data', (c: Buffer) => (stderr += c.toString()))
  return new Promise<{ code: number | null; stdout: string; stderr: string }>((resolve) =>
    child.on('close', (code) => resolve({ code, stdout, stderr })),
  )
}

const readManifest = (dir: string) =>
  JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8')) as BackupManifest

/** Every file below `dir` with its SHA-256 as GNU coreutils' sha256sum computes it. */
function sha256sums(dir: string): Record<string, string> {
  const out = spawnSync('find', ['.', '-type', 'f', '-exec', 'sha256sum', '{}', '+'], {
    cwd: dir,
    encoding: 'utf8',
  }).stdout
  const sums: Record<string, string> = {}
  for (const line of out.trim().split('\n').filter(Boolean)) {
    const [sum, path] = line.split(/\s+\*?/)
    sums[path.replace(/^\.\//, '')] = sum
  }
  return sums
}

/** What is at `path`, file by file, to show a refusal left it as it was. */
const snapshot = (path: string) => (existsSync(path) ? sha256sums(path) : 'absent')

function freshPlace(name: string) {
  return {
    databaseFile: join(root, name, 'data/ringdown.sqlite'),
    mediaDir: join(root, name, 'media'),
  }
}

/** The restored place holds exactly the backup, starts like a server and serves the findings. */
async function checkRestored(manifest: BackupManifest, place: ReturnType<typeof freshPlace>) {
  const raw = createKnex(place.databaseFile)
  const counts: Record<string, number> = {}
  for (const table of Object.keys(manifest.tables))
    counts[table] = Number(((await raw(table).count({ n: '*' }).first()) as { n: number }).n)
  // SQLite's own checker on the restored file.
  const integrity = await raw.raw('pragma integrity_check')
  const restoredAnswers = await raw('answers').orderBy('id')
  await raw.destroy()
  expect(integrity).toEqual([{ integrity_check: 'ok' }])
  expect(counts).toEqual(manifest.tables)
  const included = manifest.tables.answers
  expect(restoredAnswers).toHaveLength(included)
  // The answers are the first ones saved, byte for byte: one moment of the live database.
  expect(restoredAnswers).toEqual(await t.knex('answers').orderBy('id').limit(included))

  const restored = await fileApp(place.databaseFile, place.mediaDir)
  try {
    const agent = await signInAs(restored.app, 'developer')
    expect(findingsAt.has(included)).toBe(true)
    expect(await findingsOf(agent)).toEqual(findingsAt.get(included))
  } finally {
    await restored.close()
  }
  const liveMedia = sha256sums(live.mediaDir)
  delete liveMedia['incoming/upload-in-flight.part']
  expect(sha256sums(place.mediaDir)).toEqual(liveMedia)
}

describe('a backup taken while players save answers', () => {
  it('restores to the database of one moment: the same findings, the same answers', async () => {
    const dir = join(root, 'backup-in-process')
    const { manifest } = await backupUnderLoad(
      'createBackup',
      async () => (await createBackup({ ...live, targetDir: dir, now: clock.now() })).manifest,
    )
    expect(readManifest(dir)).toEqual(manifest)
    expect(manifest.createdAt).toBe('2026-12-01T09:00:00.000Z')
    expect(manifest.ringdownVersion).toBe(
      JSON.parse(readFileSync(join(PROJECT, 'package.json'), 'utf8')).version,
    )
    // knex applies migrations in file-name order, so the latest is the last file.
    expect(manifest.latestMigration).toBe(readdirSync(migrationsDir).sort().at(-1))
    // Each checksum against GNU coreutils' sha256sum; the manifest itself is not listed.
    const sums = sha256sums(dir)
    delete sums['manifest.json']
    expect(Object.fromEntries(manifest.files.map((f) => [f.path, [f.sha256, f.size]]))).toEqual(
      Object.fromEntries(
        Object.entries(sums).map(([path, sum]) => [path, [sum, statSync(join(dir, path)).size]]),
      ),
    )
    expect(manifest.files.some((f) => f.path.startsWith('media/incoming'))).toBe(false)
    expect(readdirSync(root).filter((n) => n.includes('partial'))).toEqual([])

    const place = freshPlace('restored-in-process')
    await restoreBackup({ backupDir: dir, ...place })
    await checkRestored(manifest, place)
  }, 60_000)

  it('works the same through npm run backup and npm run restore beside the running server', async () => {
    const dir = join(root, 'backup-by-script')
    let result: Awaited<ReturnType<typeof run>> | undefined
    const { manifest, during } = await backupUnderLoad('npm run backup', async () => {
      result = await run(['backup', dir], live)
      return readManifest(dir)
    })
    expect(result).toMatchObject({ code: 0, stderr: '' })
    expect(result!.stdout).toMatch(/^Backup written to .*backup-by-script: \d+ answers/)
    // A separate process copies while this one writes: saves went on during the backup.
    expect(during).toBeGreaterThan(0)

    const place = freshPlace('restored-by-script')
    const restored = await run(['restore', dir], place)
    expect(restored).toMatchObject({ code: 0, stderr: '' })
    expect(restored.stdout).toMatch(/^Restored the backup of /)
    await checkRestored(manifest, place)
  }, 60_000)
})

describe('refusals leave everything as it was', () => {
  const good = join(root, 'good')
  beforeAll(async () => {
    await createBackup({ ...live, targetDir: good })
  })

  async function refused(promise: Promise<unknown>, message: RegExp) {
    const err = await promise.then(
      () => null,
      (e: unknown) => e,
    )
    expect(err).toBeInstanceOf(BackupError)
    expect((err as Error).message).toMatch(message)
  }
  /** What the operator sees: one plain sentence on stderr, nothing on stdout, exit code 1. */
  function saidOnce(r: Awaited<ReturnType<typeof run>>, message: RegExp) {
    expect(r.code).toBe(1)
    expect(r.stdout).toBe('')
    expect(r.stderr).toMatch(/^[^\n]+\.\n$/)
    expect(r.stderr).toMatch(message)
  }
  const partials = () => readdirSync(root).filter((n) => /partial|restoring/.test(n))

  it('will not write a backup into a folder that holds anything', async () => {
    const dir = join(root, 'holds-notes')
    mkdirSync(dir)
    writeFileSync(join(dir, 'notes.txt'), 'Tuesday: fit the new A strings slowly.')
    const before = snapshot(dir)

    await refused(createBackup({ ...live, targetDir: dir }), /is not empty/)
    saidOnce(await run(['backup', dir], live), /holds-notes is not empty/)

    expect(snapshot(dir)).toEqual(before)
    expect(partials()).toEqual([])
  })

  it('will not write a backup where no folder can be made', async () => {
    const blocker = join(root, 'a-plain-file')
    writeFileSync(blocker, 'not a folder')

    await refused(
      createBackup({ ...live, targetDir: join(blocker, 'backup') }),
      /cannot be written: part of the path is a file/,
    )

    expect(readFileSync(blocker, 'utf8')).toBe('not a folder')
    expect(partials()).toEqual([])
  })

  it('will not write a backup into a read-only folder', async (ctx) => {
    const locked = join(root, 'locked')
    mkdirSync(locked)
    chmodSync(locked, 0o555)
    const target = join(locked, 'backup')
    try {
      if (process.getuid?.() !== 0) {
        await refused(createBackup({ ...live, targetDir: target }), /permission denied/)
      } else {
        // Permissions do not bind root, so the script runs as the unprivileged user instead.
        chmodSync(root, 0o755)
        const nobody = { uid: 65534, gid: 65534 }
        const probe = spawnSync(
          process.execPath,
          ['-e', `require('fs').accessSync(${JSON.stringify(join(PROJECT, 'package.json'))})`],
          nobody,
        )
        if (probe.status !== 0) ctx.skip()
        saidOnce(
          await run(['backup', target], live, { ...nobody, direct: true }),
          /locked\/backup cannot be written: permission denied/,
        )
      }
      expect(readdirSync(locked)).toEqual([])
    } finally {
      chmodSync(locked, 0o755)
      chmodSync(root, 0o700)
    }
  })

  it('leaves nothing behind when a backup fails half-way', async () => {
    const notDatabase = join(root, 'not-a-database.sqlite')
    writeFileSync(notDatabase, 'These are bench notes, not a database.')
    const target = join(root, 'half-made')

    await expect(
      createBackup({ databaseFile: notDatabase, mediaDir: live.mediaDir, targetDir: target }),
    ).rejects.toThrow()

    expect(existsSync(target)).toBe(false)
    expect(partials()).toEqual([])
  })

  it('will not restore over a database that exists', async () => {
    const place = freshPlace('has-a-database')
    mkdirSync(join(root, 'has-a-database/data'), { recursive: true })
    writeFileSync(place.databaseFile, 'the database of another workshop')
    const before = snapshot(join(root, 'has-a-database'))

    await refused(restoreBackup({ backupDir: good, ...place }), /already exists/)
    saidOnce(await run(['restore', good], place), /ringdown\.sqlite already exists/)

    expect(snapshot(join(root, 'has-a-database'))).toEqual(before)
  })

  it('will not restore into a media folder that holds anything', async () => {
    const place = freshPlace('has-media')
    mkdirSync(join(place.mediaDir, 'originals'), { recursive: true })
    writeFileSync(join(place.mediaDir, 'originals/keep.wav'), "someone else's recording")
    const before = snapshot(join(root, 'has-media'))

    await refused(restoreBackup({ backupDir: good, ...place }), /media folder .* is not empty/)

    expect(snapshot(join(root, 'has-media'))).toEqual(before)
    expect(existsSync(place.databaseFile)).toBe(false)
  })

  it('will not restore a damaged, incomplete, doctored or newer backup', async () => {
    const manifest = readManifest(good)
    const rendition = manifest.files.find((f) => f.path.startsWith('media/renditions/'))!.path
    const cases: [string, (dir: string) => void, RegExp][] = [
      [
        'database.sqlite',
        (dir) => flipByte(join(dir, 'database.sqlite')),
        /database\.sqlite does not match its checksum/,
      ],
      ['rendition', (dir) => flipByte(join(dir, rendition)), /does not match its checksum/],
      ['missing', (dir) => rmSync(join(dir, rendition)), /is missing media\/renditions\//],
      [
        'migration',
        (dir) =>
          writeFileSync(
            join(dir, 'manifest.json'),
            JSON.stringify({ ...manifest, latestMigration: '20991231000000_later.ts' }),
          ),
        /made by a newer Ringdown/,
      ],
      [
        'path',
        (dir) => {
          const escape = {
            path: 'media/originals/../../../escaped.txt',
            size: 0,
            sha256: '0'.repeat(64),
          }
          writeFileSync(
            join(dir, 'manifest.json'),
            JSON.stringify({ ...manifest, files: [...manifest.files, escape] }),
          )
        },
        /is not one Ringdown wrote/,
      ],
    ]
    for (const [name, damage, message] of cases) {
      const dir = join(root, `damaged-${name}`)
      cpSync(good, dir, { recursive: true })
      damage(dir)
      const place = freshPlace(`from-damaged-${name}`)

      await refused(restoreBackup({ backupDir: dir, ...place }), message)

      expect(snapshot(join(root, `from-damaged-${name}`))).toBe('absent')
    }
    saidOnce(
      await run(['restore', join(root, 'damaged-rendition')], freshPlace('from-damaged-rendition')),
      /the backup is damaged/,
    )
    expect(partials()).toEqual([])
  })

  it('restores into an empty database file and an empty media folder', async () => {
    const place = freshPlace('empty-place')
    mkdirSync(join(root, 'empty-place/data'), { recursive: true })
    writeFileSync(place.databaseFile, '')
    mkdirSync(place.mediaDir)

    await restoreBackup({ backupDir: good, ...place })

    await checkRestored(readManifest(good), place)
  })
})

function flipByte(path: string) {
  const bytes = readFileSync(path)
  bytes[bytes.length >> 1] ^= 0xff
  writeFileSync(path, bytes)
}

describe('files still being written', () => {
  // An upload or rendition in progress is written under a part name and renamed when complete
  // (server/clips/storage.ts); only complete files belong in a backup.
  it('are left out of a backup', async () => {
    const part = join(mediaFolders(live.mediaDir).originals, `${'ab'.repeat(16)}.wav.part`)
    writeFileSync(part, 'half a take')
    try {
      const { manifest } = await createBackup({ ...live, targetDir: join(root, 'with-part') })
      expect(manifest.files.some((f) => f.path.endsWith('.part'))).toBe(false)
      expect(manifest.files.some((f) => f.path.startsWith('media/originals/'))).toBe(true)
    } finally {
      rmSync(part)
    }
  })
})

describe('checksums', () => {
  it('are SHA-256 as FIPS 180-2 defines it', async () => {
    const file = join(root, 'abc.txt')
    writeFileSync(file, 'abc')
    // FIPS 180-2, Appendix B.1: the SHA-256 message digest of "abc".
    expect(await hashFile(file)).toEqual({
      size: 3,
      sha256: 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad',
    })
  })
})
