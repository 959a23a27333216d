import { spawn, type ChildProcess } from 'node:child_process'
import { request as httpRequest } from 'node:http'
import { mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { encodeWav, synth } from '../../server/audio'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { createKnex } from '../../server/db/knex'
import { isOpaqueName, mediaFolders } from '../../server/clips/storage'
import { waitForHealth } from '../bench/childServer'

// The real server in its own process, killed with SIGKILL (no handler runs, nothing is
// tidied) while an upload arrives and again while one is measured and rendered; then started
// again. After the start-up sweep the media folders hold only what clip rows name, and every
// named file is whole.

const PORT = 3937
const base = `http://127.0.0.1:${PORT}`
const dir = mkdtempSync(join(tmpdir(), 'ringdown-crash-'))
const databaseFile = join(dir, 'crash.sqlite')
const mediaDir = join(dir, 'media')
const folders = mediaFolders(mediaDir)
let child: ChildProcess | undefined

async function start(): Promise<ChildProcess> {
  const c = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      ...process.env,
      NODE_ENV: 'test',
      PORT: String(PORT),
      DATABASE_FILE: databaseFile,
      MEDIA_DIR: mediaDir,
      JWT_SECRET: 'crash-secret-crash-secret-crash-secret',
      RINGDOWN_API_ONLY: '1',
      WORKER_THREADS: '1',
      // The first sweep waits out a previous process's shutdown grace; none is wanted here.
      SHUTDOWN_GRACE_MS: '0',
      SWEEP_MINUTES: '60',
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  child = c
  await waitForHealth(base)
  return c
}

async function kill(c: ChildProcess) {
  const exited = new Promise((r) => c.once('exit', r))
  c.kill('SIGKILL')
  await exited
}

afterAll(async () => {
  if (child && child.exitCode === null && child.signalCode === null) await kill(child)
  rmSync(dir, { recursive: true, force: true })
})

const filesIn = (d: string) => {
  try {
    return readdirSync(d)
  } catch {
    return []
  }
}
const sizeOf = (path: string) => statSync(path).size

async function signIn(): Promise<string> {
  const res = await fetch(`${base}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'developer@ringdown.test', password: DEMO_PASSWORD }),
  })
  expect(res.status).toBe(200)
  return res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ')
}

interface Upload {
  /** Resolves with the status, or rejects when the server goes away. */
  done: Promise<number>
  /** Sends the part of the body not sent yet. */
  rest(): void
}

/** An upload sent in two parts: the first `firstBytes` of the body, the rest when asked. */
function startUpload(
  cookie: string,
  fields: Record<string, string>,
  wav: Uint8Array,
  firstBytes: number,
): Upload {
  const boundary = 'ringdown-crash-boundary'
  const head = Buffer.from(
    Object.entries(fields)
      .map(
        ([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`,
      )
      .join('') +
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="take.wav"\r\n` +
      'Content-Type: audio/wav\r\n\r\n',
  )
  const body = Buffer.concat([head, Buffer.from(wav), Buffer.from(`\r\n--${boundary}--\r\n`)])
  const req = httpRequest(`${base}/api/clips`, {
    method: 'POST',
    headers: {
      cookie,
      'content-type': `multipart/form-data; boundary=${boundary}`,
      'content-length': body.length,
    },
  })
  const done = new Promise<number>((resolve, reject) => {
    req.on('response', (res) => {
      res.resume()
      resolve(res.statusCode ?? 0)
    })
    req.on('error', reject)
  })
  done.catch(() => {})
  req.write(body.subarray(0, firstBytes))
  return { done, rest: () => req.end(body.subarray(firstBytes)) }
}

async function until(what: string, check: () => boolean, ms = 20_000) {
  const deadline = Date.now() + ms
  while (!check()) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 5))
  }
}

/** What the media folders hold that no clip row names, and which named files are not whole. */
async function leftovers() {
  const knex = createKnex(databaseFile)
  try {
    const rows: { original_file: string; rendition_file: string }[] = await knex('clips').select(
      'original_file',
      'rendition_file',
    )
    const originals = new Set(rows.map((r) => r.original_file))
    const renditions = new Set(rows.map((r) => r.rendition_file))
    const all = [
      ...filesIn(folders.incoming).map((n) => `incoming/${n}`),
      ...filesIn(folders.originals).map((n) => `originals/${n}`),
      ...filesIn(folders.renditions).map((n) => `renditions/${n}`),
    ]
    return {
      rows: rows.length,
      parts: all.filter((p) => p.endsWith('.part')),
      orphanOriginals: filesIn(folders.originals).filter(
        (n) => isOpaqueName(n) && !originals.has(n),
      ),
      orphanRenditions: filesIn(folders.renditions).filter(
        (n) => isOpaqueName(n) && !renditions.has(n),
      ),
      // A WAV header alone is 44 bytes: a named file no larger holds no sound.
      notWhole: [
        ...[...originals].filter(
          (n) =>
            !filesIn(folders.originals).includes(n) || sizeOf(join(folders.originals, n)) <= 44,
        ),
        ...[...renditions].filter(
          (n) =>
            !filesIn(folders.renditions).includes(n) || sizeOf(join(folders.renditions, n)) <= 44,
        ),
      ],
    }
  } finally {
    await knex.destroy()
  }
}

describe('a server killed during uploads', () => {
  it('leaves, once started again, no parts, no orphans and no empty renditions', async () => {
    const tone = synth.bowedTone({ f0: 196, seconds: 60, attackSeconds: 0.08 })
    const long = encodeWav([tone, tone.map((x) => 0.8 * x)], 48_000, { bitDepth: 24 })
    const short = encodeWav([tone.subarray(0, 3 * 48_000)], 48_000, { bitDepth: 16 })

    let server = await start()
    const knex = createKnex(databaseFile)
    const now = new Date().toISOString()
    const [recipeId] = await knex('recipes').insert({
      name: 'Crash test plain',
      instrument: 'violin',
      string_name: 'A',
      core: 'synthetic multifilament',
      vibrating_length_mm: 328,
      created_at: now,
      updated_at: now,
    })
    const { id: excerptId }: { id: number } = await knex('excerpts').first('id')
    await knex.destroy()
    const fields = (performer: string) => ({
      recipeId: String(recipeId),
      excerptId: String(excerptId),
      performerCode: performer,
      instrumentCode: 'VN-1',
      kind: 'bowed',
    })

    // Two clips stored whole: the sweep must leave every file of theirs.
    let cookie = await signIn()
    for (const p of ['CR-1', 'CR-2']) {
      const whole = startUpload(cookie, fields(p), short, 0)
      whole.rest()
      expect(await whole.done).toBe(201)
    }

    // 1. Killed while the file arrives: its part is on disk.
    const arriving = startUpload(cookie, fields('CR-1'), long, Math.floor(long.length / 2))
    await until('the upload part', () =>
      filesIn(folders.incoming).some((n) => sizeOf(join(folders.incoming, n)) > 1_000_000),
    )
    await kill(server)
    await expect(arriving.done).rejects.toThrow()
    expect((await leftovers()).parts.length).toBeGreaterThan(0)

    // 2. Killed while the whole file is measured and its set rendered: the original is in place
    // and its row not yet written.
    server = await start()
    cookie = await signIn()
    const originalsBefore = new Set(filesIn(folders.originals))
    const stored = startUpload(cookie, fields('CR-2'), long, 0)
    stored.rest()
    await until('the new original', () =>
      filesIn(folders.originals).some((n) => !originalsBefore.has(n)),
    )
    await kill(server)
    await expect(stored.done).rejects.toThrow()
    const afterKills = await leftovers()
    expect(afterKills.orphanOriginals.length).toBeGreaterThan(0)

    // 3. Started again: the sweep runs once the previous process must have gone.
    server = await start()
    await until(
      'the sweep',
      () =>
        [folders.incoming, folders.originals, folders.renditions].every((d) =>
          filesIn(d).every((n) => !n.endsWith('.part')),
        ) && filesIn(folders.originals).length === 2,
      15_000,
    ).catch(() => {})
    const after = await leftovers()
    expect(after).toEqual({
      rows: 2,
      parts: [],
      orphanOriginals: [],
      orphanRenditions: [],
      notWhole: [],
    })
    // Still a working server: the clips it kept are listed.
    cookie = await signIn()
    const list = await fetch(`${base}/api/clips`, { headers: { cookie } })
    expect(((await list.json()) as { clips: unknown[] }).clips).toHaveLength(2)
    await kill(server)
  }, 120_000)
})
