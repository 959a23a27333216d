import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { encodeWav, synth, writeRenditionWav } from '../../server/audio'
import { writeRenditionWavFile } from '../../server/audio/wavWriter'
import { mediaFolders } from '../../server/clips/storage'
import { FLUSH_EVERY_BYTES, flushCounter } from '../../server/lib/steadyFlush'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addRecipe } from './sessionFixtures'

// Large files are flushed to disk every few megabytes as they are written (the figures are in
// the saves-during-upload bench). What must hold here is that the bytes are the same as
// without: an upload and a rendition that cross several flushes arrive whole and in order.

const RATE = 48_000
// 40 s of 24-bit stereo: 11.5 MB, past one flush of the upload and of the rendition.
const tone = synth.bowedTone({ f0: 196, seconds: 40, attackSeconds: 0.08 })
const channels = [tone, tone.map((x) => 0.5 * x)]

describe('the flush counter', () => {
  it(`says to flush after every ${FLUSH_EVERY_BYTES / 1024 / 1024} MiB written, and not before`, () => {
    const counter = flushCounter()
    const MiB = 1024 * 1024
    const trips = Array.from({ length: 20 }, () => counter.wrote(MiB))
    expect(trips.flatMap((t, i) => (t ? [i + 1] : []))).toEqual([8, 16])
  })
})

describe('a long rendition written to a file', () => {
  it('holds exactly the bytes made in memory, across several flushes', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'ringdown-flush-'))
    try {
      const path = join(dir, 'rendition.wav')
      const options = { bitDepth: 24 as const, gainDb: -3 }
      await writeRenditionWavFile(path, channels, RATE, options)
      const written = readFileSync(path)
      expect(written.length).toBeGreaterThan(FLUSH_EVERY_BYTES)
      expect(written.equals(Buffer.from(writeRenditionWav(channels, RATE, options)))).toBe(true)
    } finally {
      rmSync(dir, { recursive: true, force: true })
    }
  })
})

describe('a long upload', () => {
  let t: TestApp
  let developer: Agent
  let mediaDir: string
  beforeAll(async () => {
    mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-flush-up-'))
    t = await buildApp({ config: { mediaDir } })
    developer = await signInAs(t.app, 'developer')
  })
  afterAll(async () => {
    await t.close()
    rmSync(mediaDir, { recursive: true, force: true })
  })

  it('keeps the original byte for byte', async () => {
    const take = Buffer.from(encodeWav(channels, RATE, { bitDepth: 24 }))
    expect(take.length).toBeGreaterThan(FLUSH_EVERY_BYTES)
    const recipeId = await addRecipe(t.knex, 'Flush plain')
    const excerptId = (await developer.get('/api/excerpts')).body.excerpts[0].id
    const res = await developer
      .post('/api/clips')
      .field('recipeId', String(recipeId))
      .field('excerptId', String(excerptId))
      .field('performerCode', 'FL-1')
      .field('instrumentCode', 'VN-1')
      .field('kind', 'bowed')
      .attach('file', take, { filename: 'long take.wav', contentType: 'audio/wav' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const originals = mediaFolders(mediaDir).originals
    const [name] = readdirSync(originals)
    expect(readFileSync(join(originals, name)).equals(take)).toBe(true)
  }, 60_000)
})
