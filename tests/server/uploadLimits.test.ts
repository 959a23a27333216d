import { mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs'
import http from 'node:http'
import type { AddressInfo } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { encodeWav, infoListChunk, synth } from '../../server/audio/index.ts'
import { mediaFolders } from '../../server/clips/storage'
import {
  buildApp,
  cookieValue,
  DEMO,
  DEMO_PASSWORD,
  sessionCookie,
  signInAs,
  type Agent,
  type TestApp,
} from './helpers'
import request from 'supertest'

/*
 * How much one upload may bring. A refusal is 413 Content Too Large (RFC 9110 §15.5.14): the
 * request is refused for its size alone, whatever it holds, and nothing of it is kept.
 */

const RATE = 48_000
const MiB = 1024 * 1024
const HEADER = 'file,recipe,excerpt,performer_code,instrument_code,kind'

// A 16-bit mono WAV holds 96 000 bytes a second at 48 kHz; a tone of about `mb` MiB.
const wavOf = (mb: number, f0 = 196) =>
  encodeWav(
    [synth.bowedTone({ f0, seconds: (mb * MiB) / (2 * RATE), attackSeconds: 0.05 })],
    RATE,
    { bitDepth: 16 },
  )

function filesUnder(dir: string): string[] {
  try {
    return readdirSync(dir, { recursive: true, withFileTypes: true })
      .filter((d) => d.isFile())
      .map((d) => join(d.parentPath, d.name))
  } catch {
    return []
  }
}

const bytesUnder = (dir: string) => filesUnder(dir).reduce((n, f) => n + statSync(f).size, 0)

async function addRecipe(t: TestApp, name: string) {
  const now = new Date().toISOString()
  const [id] = await t.knex('recipes').insert({
    name,
    instrument: 'violin',
    string_name: 'A',
    core: 'synthetic multifilament',
    vibrating_length_mm: 328,
    created_at: now,
    updated_at: now,
  })
  return id as number
}

const clipCount = async (t: TestApp) => Number((await t.knex('clips').count({ n: '*' }))[0].n)

const manifest = (names: string[], performer: string) =>
  [HEADER, ...names.map((n) => `${n},Limits A,open string,${performer},VN-1,bowed`)].join('\n')

function batch(agent: Agent, names: string[], files: Uint8Array[], performer: string) {
  let req = agent
    .post('/api/clips/batch')
    .attach('manifest', Buffer.from(manifest(names, performer)), {
      filename: 'manifest.csv',
      contentType: 'text/csv',
    })
  files.forEach((bytes, i) => {
    req = req.attach('files', Buffer.from(bytes), { filename: names[i], contentType: 'audio/wav' })
  })
  return req
}

// Per file 2 MB, per request 3 MB.
const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-limits-'))
let t: TestApp
let developer: Agent
let recipeId: number
let excerptId: number

beforeAll(async () => {
  t = await buildApp({ config: { mediaDir, uploadMaxMb: 2, uploadBatchMaxMb: 3 } })
  developer = await signInAs(t.app, 'developer')
  recipeId = await addRecipe(t, 'Limits A')
  const excerpts = (await developer.get('/api/excerpts')).body.excerpts as {
    id: number
    name: string
  }[]
  excerptId = excerpts.find((e) => e.name === 'open string')!.id
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

describe('the total of one upload', () => {
  it('refuses a batch whose files together pass the limit, naming it, and keeps nothing', async () => {
    const before = filesUnder(mediaDir)
    const count = await clipCount(t)

    // Each file is within the 2 MB for one file; together they come to 3.6 MB.
    const res = await batch(developer, ['a.wav', 'b.wav'], [wavOf(1.8), wavOf(1.8, 220)], 'PL-1')

    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
    expect(res.body.error.message).toMatch(/limit of 3 MB for one upload; nothing was stored/)
    expect(filesUnder(mediaFolders(mediaDir).incoming)).toEqual([])
    expect(filesUnder(mediaDir)).toEqual(before)
    expect(await clipCount(t)).toBe(count)
  })

  it('counts the files of a request sent without a length as they arrive', async () => {
    const count = await clipCount(t)
    const server = http.createServer(t.app).listen(0)
    try {
      const { port } = server.address() as AddressInfo
      const login = await request(server)
        .post('/api/auth/login')
        .send({ email: DEMO.developer, password: DEMO_PASSWORD })
      const cookie = cookieValue(sessionCookie(login)!)
      const boundary = 'ringdown-limits-boundary'
      const names = ['a.wav', 'b.wav', 'c.wav']
      const part = (name: string, filename: string, type: string) =>
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="${name}"; ` +
            `filename="${filename}"\r\nContent-Type: ${type}\r\n\r\n`,
        )
      const body = [
        part('manifest', 'manifest.csv', 'text/csv'),
        Buffer.from(`${manifest(names, 'PL-2')}\r\n`),
        ...names.flatMap((n, i) => [
          part('files', n, 'audio/wav'),
          Buffer.from(wavOf(1.5, 200 + 20 * i)),
          Buffer.from('\r\n'),
        ]),
      ]
      const req = http.request({
        port,
        method: 'POST',
        path: '/api/clips/batch',
        headers: {
          cookie,
          'content-type': `multipart/form-data; boundary=${boundary}`,
          'transfer-encoding': 'chunked',
        },
      })
      const answer = new Promise<{ status: number; body: { error: { code: string } } }>(
        (resolve, reject) => {
          req.on('response', (res) => {
            let text = ''
            res.on('data', (c: Buffer) => (text += c.toString()))
            res.on('end', () => resolve({ status: res.statusCode!, body: JSON.parse(text) }))
          })
          req.on('error', reject)
        },
      )
      const all = Buffer.concat(body)
      for (let at = 0; at < all.length; at += 64 * 1024) {
        req.write(all.subarray(at, at + 64 * 1024))
        await new Promise((r) => setImmediate(r))
      }
      // All 4.5 MB are sent and the request is still open: no more than the limit was written.
      await new Promise((r) => setTimeout(r, 200))
      expect(bytesUnder(mediaFolders(mediaDir).incoming)).toBeLessThanOrEqual(3 * MiB)
      req.end(`--${boundary}--\r\n`)

      const res = await answer
      expect(res.status).toBe(413)
      expect(res.body.error.code).toBe('payload_too_large')
      expect(filesUnder(mediaFolders(mediaDir).incoming)).toEqual([])
      expect(await clipCount(t)).toBe(count)
    } finally {
      await new Promise((r) => server.close(r))
    }
  })

  it('still holds each file to the limit for one file', async () => {
    const count = await clipCount(t)
    const res = await developer
      .post('/api/clips')
      .field('recipeId', String(recipeId))
      .field('excerptId', String(excerptId))
      .field('performerCode', 'PL-3')
      .field('instrumentCode', 'VN-1')
      .field('kind', 'bowed')
      .attach('file', Buffer.from(wavOf(2.5)), { filename: 'long.wav', contentType: 'audio/wav' })

    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
    expect(res.body.error.message).toMatch(/larger than the upload limit of 2 MB/)
    expect(filesUnder(mediaFolders(mediaDir).incoming)).toEqual([])
    expect(await clipCount(t)).toBe(count)
  })

  it('stores a batch within both limits', async () => {
    const res = await batch(developer, ['a.wav', 'b.wav'], [wavOf(1.2), wavOf(1.2, 220)], 'PL-4')
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.clips).toHaveLength(2)
    expect(filesUnder(mediaFolders(mediaDir).incoming)).toEqual([])
  })
})

describe('a recording read from its file in blocks', () => {
  it('measures a WAV with a large chunk before its samples as BS.1770 defines', async () => {
    // EBU Tech 3341 (2016), test case 1: a 1 kHz sine at −23 dBFS in both channels of a stereo
    // programme reads −23.0 ± 0.1 LUFS. 200 kB of notes before the samples put them beyond the
    // first header read; 24-bit stereo frames (6 bytes) do not divide the 1 MB read blocks.
    const sine = synth.stereoSine({ frequency: 1000, seconds: 5, peakDbfs: -23 })
    const wav = encodeWav(sine, RATE, {
      bitDepth: 24,
      chunksBeforeData: [infoListChunk({ ICMT: 'n'.repeat(200_000) })],
    })
    const res = await developer
      .post('/api/clips')
      .field('recipeId', String(recipeId))
      .field('excerptId', String(excerptId))
      .field('performerCode', 'PL-5')
      .field('instrumentCode', 'VN-1')
      .field('kind', 'bowed')
      .attach('file', Buffer.from(wav), { filename: 'sine.wav', contentType: 'audio/wav' })

    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const clip = res.body.clip
    expect(clip).toMatchObject({ channels: 2, bitDepth: 24, sampleRate: RATE })
    expect(clip.durationS).toBeCloseTo(5, 6)
    expect(clip.loudnessLufs).toBeCloseTo(-23, 1)
    expect(clip.peakDbfs).toBeCloseTo(-23, 1)
    expect(clip.f0Hz).toBeCloseTo(1000, 0)
  })
})

describe('the total of one upload, below the size of one file', () => {
  // Per file 5 MB, per request half a megabyte: the request limit is the one that bites.
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-limits-small-'))
  let small: TestApp

  beforeAll(async () => {
    small = await buildApp({ config: { mediaDir: dir, uploadMaxMb: 5, uploadBatchMaxMb: 0.5 } })
  })
  afterAll(async () => {
    await small.close()
    rmSync(dir, { recursive: true, force: true })
  })

  it('applies to a single recording too', async () => {
    const agent = await signInAs(small.app, 'developer')
    const recipe = await addRecipe(small, 'Limits A')
    const res = await agent
      .post('/api/clips')
      .field('recipeId', String(recipe))
      .field('excerptId', String(excerptId))
      .field('performerCode', 'PL-6')
      .field('instrumentCode', 'VN-1')
      .field('kind', 'bowed')
      .attach('file', Buffer.from(wavOf(1)), { filename: 'take.wav', contentType: 'audio/wav' })

    expect(res.status).toBe(413)
    expect(res.body.error.message).toMatch(/limit of 0.5 MB for one upload/)
    expect(filesUnder(dir)).toEqual([])
    expect(await clipCount(small)).toBe(0)
  })

  it('applies to the panel import', async () => {
    const admin = await signInAs(small.app, 'admin')
    const before = Number((await small.knex('players').count({ n: '*' }))[0].n)
    // Within the 1 MB a panel file may have, beyond the half megabyte of one upload.
    const row = 'Filler Row,filler@example.test,violin,student,,,' + 'x'.repeat(200) + '\n'
    const csv =
      'name,email,instruments,level,region,consent_date,notes\n' +
      row.repeat(Math.ceil(700_000 / row.length))

    const res = await admin.post('/api/panel/import').attach('file', Buffer.from(csv), 'panel.csv')

    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
    expect(res.body.error.message).toMatch(/limit of 0.5 MB for one upload/)
    expect(Number((await small.knex('players').count({ n: '*' }))[0].n)).toBe(before)
  })
})
