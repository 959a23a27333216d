import { mkdirSync, mkdtempSync, readdirSync, rmSync, utimesSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Writable } from 'node:stream'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import pino from 'pino'
import { encodeWav, synth } from '../../server/audio'
import { mediaFolders, opaqueName } from '../../server/clips/storage'
import { holdFile, releaseFile } from '../../server/clips/filesInProgress'
import { startMediaSweep, sweepMedia, SWEEP_SAFE_AGE_MS } from '../../server/clips/sweep'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addRecipe } from './sessionFixtures'

// The sweep removes what no clip row names and nothing a row names. Only files of our own
// naming (32 hex digits, then .wav/.flac and/or .part) are ever candidates: a name of any other
// form was put there by someone else.

const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-sweep-'))
const folders = mediaFolders(mediaDir)
const hex = () => opaqueName('wav').slice(0, 32)
const twoHoursAgo = () => new Date(Date.now() - 2 * 3_600_000)

let t: TestApp
let developer: Agent
let recipeId: number
let excerptId: number
let performer = 0

beforeAll(async () => {
  t = await buildApp({ config: { mediaDir } })
  developer = await signInAs(t.app, 'developer')
  recipeId = await addRecipe(t.knex, 'Sweep plain')
  excerptId = (await developer.get('/api/excerpts')).body.excerpts[0].id
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

function upload(seconds = 2) {
  const tone = synth.bowedTone({ f0: 440, seconds, attackSeconds: 0.05, delaySeconds: 0.1 })
  return developer
    .post('/api/clips')
    .field('recipeId', String(recipeId))
    .field('excerptId', String(excerptId))
    .field('performerCode', `SW-${++performer}`)
    .field('instrumentCode', 'VN-1')
    .field('kind', 'bowed')
    .attach('file', Buffer.from(encodeWav([tone], 48_000, { bitDepth: 16 })), {
      filename: 'take.wav',
      contentType: 'audio/wav',
    })
}

/** A file of `bytes` bytes, last changed at `when`. */
function leftover(dir: string, name: string, bytes: number, when = twoHoursAgo()) {
  mkdirSync(dir, { recursive: true })
  const path = join(dir, name)
  writeFileSync(path, Buffer.alloc(bytes, 1))
  utimesSync(path, when, when)
  return path
}

const names = (dir: string) => readdirSync(dir).sort()

async function referenced() {
  const rows: { original_file: string; rendition_file: string }[] = await t
    .knex('clips')
    .select('original_file', 'rendition_file')
  return {
    originals: rows.map((r) => r.original_file),
    renditions: rows.map((r) => r.rendition_file),
  }
}

describe('the media sweep', () => {
  it('removes exactly the leftovers, and leaves every file a clip names', async () => {
    for (let i = 0; i < 2; i++) expect((await upload()).status).toBe(201)
    const named = await referenced()
    // The clips' own files are old too: age alone must not make a named file a leftover.
    for (const f of named.originals)
      utimesSync(join(folders.originals, f), twoHoursAgo(), twoHoursAgo())
    for (const f of named.renditions)
      utimesSync(join(folders.renditions, f), twoHoursAgo(), twoHoursAgo())

    const stalePart = leftover(folders.incoming, `${hex()}.part`, 3000)
    const freshPart = leftover(folders.incoming, `${hex()}.part`, 100, new Date())
    const heldPart = leftover(folders.incoming, `${hex()}.part`, 100)
    holdFile(heldPart)
    const orphanOriginal = leftover(folders.originals, opaqueName('flac'), 5000)
    const freshOrphan = leftover(folders.originals, opaqueName('wav'), 100, new Date())
    const originalPart = leftover(folders.originals, `${opaqueName('wav')}.part`, 700)
    const orphanRendition = leftover(folders.renditions, opaqueName('wav'), 2000)
    const renditionPart = leftover(folders.renditions, `${opaqueName('wav')}.part`, 300)
    const notOurs = leftover(folders.originals, 'notes.txt', 10)

    try {
      const report = await sweepMedia(t.knex, folders, Date.now() - SWEEP_SAFE_AGE_MS)
      expect(report).toEqual({
        parts: { files: 3, bytes: 3000 + 700 + 300 },
        originals: { files: 1, bytes: 5000 },
        renditions: { files: 1, bytes: 2000 },
        failed: 0,
        missing: 0,
      })
    } finally {
      releaseFile(heldPart)
    }
    const base = (p: string) => p.slice(p.lastIndexOf('/') + 1)
    expect(names(folders.incoming)).toEqual([base(freshPart), base(heldPart)].sort())
    expect(names(folders.originals)).toEqual(
      [...named.originals, base(freshOrphan), base(notOurs)].sort(),
    )
    expect(names(folders.renditions)).toEqual([...named.renditions].sort())
    for (const p of [stalePart, orphanOriginal, originalPart, orphanRendition, renditionPart])
      expect(names(join(p, '..'))).not.toContain(base(p))
    // The clips still play.
    const [clip] = (await developer.get('/api/clips')).body.clips
    expect((await developer.get(`/api/clips/${clip.id}/audio`)).status).toBe(200)
  })

  it('never takes the original of an upload still being stored, however old it looks', async () => {
    // An original is renamed into place before its row is written, and renditions are made in
    // between. A sweep that counted everything as old (cutoff in the future) and looked at the
    // folder in that gap would take the file from under the upload.
    // Only the clips' own files from here on: what the first test left fresh goes now.
    const start = await referenced()
    for (const n of names(folders.originals))
      if (!start.originals.includes(n)) rmSync(join(folders.originals, n))
    const before = new Set(names(folders.originals))
    // A supertest request starts when it is first awaited.
    const pending = upload(20).then((r) => r)
    let sweep: ReturnType<typeof sweepMedia> | undefined
    const deadline = Date.now() + 20_000
    while (!sweep && Date.now() < deadline) {
      if (names(folders.originals).some((n) => !before.has(n)))
        sweep = sweepMedia(t.knex, folders, Date.now() + 60_000)
      else await new Promise((r) => setImmediate(r))
    }
    expect(sweep, 'the original never appeared').toBeDefined()
    const res = await pending
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const report = await sweep!
    expect(report.originals.files + report.renditions.files).toBe(0)
    const named = await referenced()
    for (const f of named.originals) expect(names(folders.originals)).toContain(f)
    for (const f of named.renditions) expect(names(folders.renditions)).toContain(f)
  }, 30_000)

  it('logs how many files and bytes it removed, and no file names', async () => {
    const otherMedia = mkdtempSync(join(tmpdir(), 'ringdown-sweep-log-'))
    const orphan = opaqueName('wav')
    leftover(mediaFolders(otherMedia).renditions, orphan, 3 * 2 ** 20)
    const lines: { msg: string }[] = []
    const sink = new Writable({
      write(chunk, _e, done) {
        for (const l of String(chunk).split('\n').filter(Boolean)) lines.push(JSON.parse(l))
        done()
      },
    })
    const logged = await buildApp({
      config: { mediaDir: otherMedia, sweepMinutes: 60, shutdownGraceMs: 0 },
      logger: pino({ level: 'info' }, sink),
    })
    const sweep = startMediaSweep(logged.app.locals.ctx)
    try {
      const deadline = Date.now() + 10_000
      while (!lines.some((l) => l.msg.startsWith('Media sweep')) && Date.now() < deadline)
        await new Promise((r) => setTimeout(r, 50))
    } finally {
      await sweep.stop()
      await logged.close()
      rmSync(otherMedia, { recursive: true, force: true })
    }
    const line = lines.find((l) => l.msg.startsWith('Media sweep removed'))
    expect(line?.msg).toContain('0 unfinished files (0.0 MB)')
    expect(line?.msg).toContain('1 renditions without a clip (3.0 MB)')
    expect(JSON.stringify(lines)).not.toContain(orphan.slice(0, 32))
  })
})
