import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { encodeWav, synth } from '../../server/audio'
import { AppError, validationFailed } from '../../server/errors'
import { RecordingRefused } from '../../server/clips/measure'
import { mediaFolders } from '../../server/clips/storage'
import { outcomeOf, valueOf } from '../../server/workers/outcome'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addRecipe } from './sessionFixtures'

// Decoding, measuring and rendition writing run in a worker thread: the answer is the one the
// main thread gives (the measures themselves are checked against references in
// tests/server/audio/), and timers keep firing meanwhile.

interface Side {
  t: TestApp
  developer: Agent
  recipeId: number
  excerptId: number
  mediaDir: string
}

async function side(workerThreads: number): Promise<Side> {
  const mediaDir = mkdtempSync(join(tmpdir(), `ringdown-clip-thread-${workerThreads}-`))
  const t = await buildApp({ config: { mediaDir, workerThreads } })
  const developer = await signInAs(t.app, 'developer')
  const recipeId = await addRecipe(t.knex, 'Thread plain')
  const excerptId = (await developer.get('/api/excerpts')).body.excerpts[0].id
  return { t, developer, recipeId, excerptId, mediaDir }
}

let threaded: Side
let inline: Side

beforeAll(async () => {
  threaded = await side(1)
  inline = await side(0)
})
afterAll(async () => {
  for (const s of [threaded, inline]) {
    await s.t.app.locals.ctx.pool.close()
    await s.t.close()
    rmSync(s.mediaDir, { recursive: true, force: true })
  }
})

function upload(s: Side, file: Uint8Array | string, performer = 'TH-1') {
  const req = s.developer
    .post('/api/clips')
    .field('recipeId', String(s.recipeId))
    .field('excerptId', String(s.excerptId))
    .field('performerCode', performer)
    .field('instrumentCode', 'VN-1')
    .field('kind', 'bowed')
  // A path is streamed from disk, as a browser sends a file: no copy of it in this process.
  return typeof file === 'string'
    ? req.attach('file', file, { contentType: 'audio/wav' })
    : req.attach('file', Buffer.from(file), { filename: 'take.wav', contentType: 'audio/wav' })
}

/** The longest any 2 ms timer waited while `work` ran. */
async function longestGap<T>(work: () => Promise<T>): Promise<[number, T, number]> {
  let longest = 0
  let last = performance.now()
  const ticker = setInterval(() => {
    const now = performance.now()
    longest = Math.max(longest, now - last)
    last = now
  }, 2)
  const started = performance.now()
  try {
    const result = await work()
    return [longest, result, performance.now() - started]
  } finally {
    clearInterval(ticker)
  }
}

const withoutIds = (clip: Record<string, unknown>) => {
  const {
    id: _id,
    recipeId: _r,
    excerptId: _e,
    createdAt: _c,
    updatedAt: _u,
    recipeName: _n,
    ...rest
  } = clip
  return rest
}

describe('clip work in a worker thread', () => {
  it('measures and renders as the main thread does, and leaves the event loop free', async () => {
    const tone = synth.bowedTone({ f0: 196, seconds: 60, attackSeconds: 0.08 })
    const take = join(threaded.mediaDir, 'take.wav')
    writeFileSync(take, encodeWav([tone, tone.map((x) => 0.7 * x)], 48_000, { bitDepth: 24 }))
    // Warmed up first: the first upload of a process also loads and compiles the clip code.
    const warm = encodeWav([tone.subarray(0, 2 * 48_000)], 48_000, { bitDepth: 16 })
    for (const s of [threaded, inline]) expect((await upload(s, warm, 'TH-0')).status).toBe(201)

    const doneBefore = threaded.t.app.locals.ctx.pool.load().done
    const [threadGap, inThread] = await longestGap(async () => upload(threaded, take))
    const [inlineGap, onMain] = await longestGap(async () => upload(inline, take))
    expect(inThread.status, JSON.stringify(inThread.body)).toBe(201)
    expect(onMain.status).toBe(201)
    // One measuring task and one set to render went to the thread.
    expect(threaded.t.app.locals.ctx.pool.load().done - doneBefore).toBe(2)

    expect(withoutIds(inThread.body.clip)).toEqual(withoutIds(onMain.body.clip))
    const rendition = async (s: Side) => {
      const row: { rendition_file: string } = await s.t
        .knex('clips')
        .where({ performer_code: 'TH-1' })
        .first('rendition_file')
      return readFileSync(join(mediaFolders(s.mediaDir).renditions, row.rendition_file))
    }
    expect((await rendition(threaded)).equals(await rendition(inline))).toBe(true)

    // On the main thread the loop stops for the decode and again for the rendition; in the
    // thread it keeps turning (what is left is the upload's own reading and writing).
    expect(inlineGap).toBeGreaterThan(100)
    expect(threadGap).toBeLessThan(inlineGap / 2)
  }, 60_000)

  it('measures again in the thread when an editor changes a clip to another kind', async () => {
    const tone = synth.bowedTone({ f0: 220, seconds: 4, attackSeconds: 0.05 })
    const made = await upload(threaded, encodeWav([tone], 48_000, { bitDepth: 16 }), 'TH-3')
    expect(made.status).toBe(201)
    const { id, revision } = made.body.clip
    const pool = threaded.t.app.locals.ctx.pool
    const asked: string[] = []
    const run = pool.run.bind(pool)
    pool.run = ((task: Parameters<typeof run>[0], ...args: unknown[]) => {
      asked.push(task)
      return (run as (...a: unknown[]) => unknown)(task, ...args)
    }) as typeof pool.run
    try {
      const changed = await threaded.developer
        .patch(`/api/clips/${id}`)
        .send({ kind: 'plucked', revision })
      expect(changed.status, JSON.stringify(changed.body)).toBe(200)
      expect(changed.body.clip.kind).toBe('plucked')
    } finally {
      pool.run = run
    }
    expect(asked).toContain('measureClip')
  })

  it('refuses a damaged recording with the same answer as the main thread', async () => {
    const good = encodeWav(
      [synth.bowedTone({ f0: 440, seconds: 3, attackSeconds: 0.05 })],
      48_000,
      {
        bitDepth: 16,
      },
    )
    const cut = good.subarray(0, 30)
    const noise = new Uint8Array(5000).fill(0x41)
    for (const bytes of [cut, noise]) {
      const a = await upload(threaded, bytes, 'TH-2')
      const b = await upload(inline, bytes, 'TH-2')
      expect(a.status).toBe(422)
      expect(a.body).toEqual(b.body)
    }
  })
})

describe('errors that cross a thread', () => {
  // Messages between threads are structured clones (HTML Living Standard, "structured
  // serialize"): an Error arrives as a plain Error, its class lost. The outcome keeps it.
  it('arrive as the same AppError, with its status, code, message and extra', async () => {
    const thrown = validationFailed('The take is too short.', { fields: { file: ['too short'] } })
    const sent = structuredClone(
      await outcomeOf(async () => {
        throw thrown
      }),
    )
    let caught: unknown
    try {
      valueOf(sent)
    } catch (err) {
      caught = err
    }
    expect(caught).toBeInstanceOf(AppError)
    const e = caught as AppError
    expect([e.status, e.code, e.message, e.extra]).toEqual([
      thrown.status,
      thrown.code,
      thrown.message,
      thrown.extra,
    ])
  })

  it('keep a refusal a refusal, and let anything else through as it was thrown', async () => {
    const refused = structuredClone(
      await outcomeOf(async () => {
        throw new RecordingRefused('The file is empty.')
      }),
    )
    expect(() => valueOf(refused)).toThrow(RecordingRefused)
    const full = Object.assign(new Error('ENOSPC: no space left on device'), { code: 'ENOSPC' })
    await expect(
      outcomeOf(async () => {
        throw full
      }),
    ).rejects.toBe(full)
  })
})
