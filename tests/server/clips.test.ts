import { mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import {
  concatBytes,
  decodeAudio,
  encodeFlac,
  encodeWav,
  infoListChunk,
  integratedLoudness,
  samplePeakDbfs,
  synth,
} from '../../server/audio/index.ts'
import { seedDemoClips } from '../../seeds/demo/clips'
import { mediaFolders } from '../../server/clips/storage'
import { systemClock } from '../../server/clock'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'

const RATE = 48_000
const SECRET_RECIPE = 'Quillon Hollowcore Secret'
const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-clips-'))

let t: TestApp
let developer: Agent
let analyst: Agent
const recipes = {} as Record<'violinA' | 'violinA2' | 'secret' | 'cello', number>
const excerpts = {} as Record<string, number>

async function addRecipe(name: string, instrument = 'violin', stringName = 'A') {
  const now = new Date().toISOString()
  const [id] = await t.knex('recipes').insert({
    name,
    instrument,
    string_name: stringName,
    core: 'synthetic multifilament',
    vibrating_length_mm: instrument === 'cello' ? 695 : 328,
    created_at: now,
    updated_at: now,
  })
  return id as number
}

beforeAll(async () => {
  t = await buildApp({ config: { mediaDir, uploadMaxMb: 2 } })
  developer = await signInAs(t.app, 'developer')
  analyst = await signInAs(t.app, 'analyst')
  recipes.violinA = await addRecipe('Testbed A plain')
  recipes.violinA2 = await addRecipe('Testbed A damped')
  recipes.secret = await addRecipe(SECRET_RECIPE)
  recipes.cello = await addRecipe('Testbed D cello', 'cello', 'D')
  for (const e of (await developer.get('/api/excerpts')).body.excerpts as {
    id: number
    name: string
  }[])
    excerpts[e.name] = e.id
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

// --- fixtures, made here rather than committed ---------------------------------------------

const tone = (seconds = 2, peakDbfs = -6) =>
  synth.bowedTone({ f0: 440, seconds, attackSeconds: 0.05, peakDbfs, delaySeconds: 0.1 })

const wav16 = (samples = tone()) => encodeWav([samples], RATE, { bitDepth: 16 })

let performerCounter = 0
/** A performer code no other test uses, so every test's matched sets are its own. */
const freshPerformer = () => `PT-${++performerCounter}`

interface Upload {
  bytes: Uint8Array
  name?: string
  contentType?: string
  fields?: Record<string, string | number>
  /** Send the file name exactly as given (percent-encoded, as RFC 7578 allows). */
  raw?: boolean
  /** Not even percent-encoded: control characters straight in the part header. */
  literalName?: boolean
}

/**
 * The multipart body written by hand: form encoders cut folders off file names and escape
 * control characters, and a test of what the server does with such names must send them as-is.
 */
function rawUpload(agent: Agent, u: Upload & { name: string }) {
  const boundary = 'ringdown-test-boundary'
  const fields = {
    recipeId: recipes.violinA,
    excerptId: excerpts['open string'],
    performerCode: 'PF-01',
    instrumentCode: 'VN-9',
    kind: 'bowed',
  }
  const parts: Buffer[] = Object.entries(fields).map(([k, v]) =>
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`),
  )
  parts.push(
    Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; ` +
        (u.literalName
          ? `filename="${u.name}"\r\n`
          : `filename*=UTF-8''${encodeURIComponent(u.name)}\r\n`) +
        `Content-Type: audio/wav\r\n\r\n`,
    ),
    Buffer.from(u.bytes),
    Buffer.from(`\r\n--${boundary}--\r\n`),
  )
  return agent
    .post('/api/clips')
    .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
    .send(Buffer.concat(parts))
}

function upload(agent: Agent | ReturnType<typeof request>, u: Upload) {
  if (u.raw) return rawUpload(agent as Agent, { ...u, name: u.name ?? 'take.wav' })
  const fields = {
    recipeId: recipes.violinA,
    excerptId: excerpts['open string'],
    performerCode: 'PF-01',
    instrumentCode: 'VN-9',
    kind: 'bowed',
    ...u.fields,
  }
  let req = agent.post('/api/clips')
  for (const [k, v] of Object.entries(fields)) req = req.field(k, String(v))
  return req.attach('file', Buffer.from(u.bytes), {
    filename: u.name ?? 'take.wav',
    contentType: u.contentType ?? 'audio/wav',
  })
}

async function uploaded(u: Upload) {
  const res = await upload(developer, u)
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body.clip as Record<string, unknown> & { id: number; renditionGainDb: number }
}

function filesUnder(dir: string): string[] {
  try {
    return readdirSync(dir, { recursive: true, withFileTypes: true })
      .filter((d) => d.isFile())
      .map((d) => join(d.parentPath, d.name))
  } catch {
    return []
  }
}

const clipCount = async () => Number((await t.knex('clips').count({ n: '*' }))[0].n)

async function rendition(agent: Agent, id: number) {
  const res = await agent.get(`/api/clips/${id}/audio`).buffer(true)
  expect(res.status).toBe(200)
  const bytes = new Uint8Array(res.body as Buffer)
  return { res, bytes, audio: await decodeAudio(bytes) }
}

function chunkIds(bytes: Uint8Array): string[] {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  const ids: string[] = []
  for (let offset = 12; offset + 8 <= bytes.length;) {
    ids.push(String.fromCharCode(...bytes.subarray(offset, offset + 4)))
    const size = view.getUint32(offset + 4, true)
    offset += 8 + size + (size & 1)
  }
  return ids
}

// --- the happy path -------------------------------------------------------------------------

describe('uploading one recording', () => {
  it('stores the measures of a 16-bit WAV, with loudness as BS.1770 defines it', async () => {
    // EBU Tech 3341 (2016), test case 1: a 1 kHz sine at −23 dBFS in both channels of a stereo
    // programme reads −23.0 ± 0.1 LUFS.
    const sine = synth.stereoSine({ frequency: 1000, seconds: 3, peakDbfs: -23 })
    const clip = await uploaded({ bytes: encodeWav(sine, RATE, { bitDepth: 16 }) })

    expect(clip).toMatchObject({ sampleRate: 48_000, channels: 2, bitDepth: 16, container: 'wav' })
    expect(clip.durationS).toBeCloseTo(3, 3)
    expect(clip.loudnessLufs as number).toBeCloseTo(-23, 1)
    expect(clip.peakDbfs as number).toBeCloseTo(-23, 1)
    expect(clip.f0Hz as number).toBeCloseTo(1000, 0)
    // A pure tone's centroid is its frequency; window leakage and 16-bit noise add a little.
    expect(Math.abs((clip.centroidHz as number) - 1000)).toBeLessThan(15)
    expect(clip.attackS).not.toBeNull()
    expect(clip.t60S).toBeNull()
    expect(Math.abs(clip.renditionGainDb)).toBeLessThan(0.1)
    const detail = (await developer.get(`/api/clips/${clip.id}`)).body.clip
    expect(detail.peaks.max.length).toBeGreaterThan(100)
    expect(Math.max(...detail.peaks.max)).toBeCloseTo(10 ** (-23 / 20), 2)
  })

  it.each([
    ['24-bit WAV', () => encodeWav([tone()], RATE, { bitDepth: 24 }), 24, 'wav'],
    [
      '32-bit float WAV',
      () => encodeWav([tone(), tone()], RATE, { bitDepth: 32, format: 'float' }),
      32,
      'wav',
    ],
    ['16-bit FLAC', () => encodeFlac([tone()], RATE, { bitDepth: 16 }), 16, 'flac'],
    ['24-bit FLAC', () => encodeFlac([tone(), tone()], RATE, { bitDepth: 24 }), 24, 'flac'],
  ] as const)('accepts a %s', async (_label, make, bitDepth, container) => {
    const clip = await uploaded({ bytes: make(), name: `take.${container}` })
    expect(clip).toMatchObject({ bitDepth, container })
    expect(clip.durationS as number).toBeCloseTo(2.1, 2)
  })

  it('brings the rendition to −23 LUFS, measured back from the served file', async () => {
    const clip = await uploaded({
      bytes: wav16(tone(3, -3)),
      fields: { performerCode: freshPerformer() },
    })
    const { audio } = await rendition(developer, clip.id)
    expect(integratedLoudness(audio.channels, audio.sampleRate)).toBeCloseTo(-23, 1)
    expect(samplePeakDbfs(audio.channels)).toBeLessThanOrEqual(-1)
  })

  it('measures decay and loss factor of a plucked ring-out', async () => {
    const bytes = wav16(
      synth.pluckedNote({ f0: 440, t60: 1.5, seconds: 3, delaySeconds: 0.1, noiseFloorDbfs: -90 }),
    )
    const clip = await uploaded({
      bytes,
      fields: { kind: 'plucked', excerptId: excerpts['pluck ring-out'] },
    })
    expect(clip.t60S as number).toBeCloseTo(1.5, 1)
    // η = 2.2 / (f · T60) (DESIGN.md; the ln(1000)/π form of the loss factor).
    expect(clip.lossFactor as number).toBeCloseTo(2.2 / (440 * 1.5), 4)
    expect(clip.attackS).toBeNull()
  })

  it('fills the string played from the recipe and refuses one the instrument lacks', async () => {
    const clip = await uploaded({ bytes: wav16() })
    expect(clip.stringPlayed).toBe('A')
    const res = await upload(developer, { bytes: wav16(), fields: { stringPlayed: 'C' } })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.stringPlayed[0]).toMatch(/violin has the strings G, D, A, E/)
  })
})

describe('blind renditions', () => {
  it('carry no trace of the recipe in bytes, URL or headers, while the original keeps its name', async () => {
    const tagged = encodeWav([tone()], RATE, {
      bitDepth: 24,
      chunksBeforeData: [
        infoListChunk({
          INAM: SECRET_RECIPE,
          ICMT: `prototype ${SECRET_RECIPE}`,
          ISFT: 'Recorder',
        }),
      ],
    })
    const name = `${SECRET_RECIPE.replace(/ /g, '_')}_take3.wav`
    const clip = await uploaded({
      bytes: tagged,
      name,
      fields: { recipeId: recipes.secret, performerCode: freshPerformer() },
    })
    expect(clip.originalName).toBe(name)

    const { res, bytes } = await rendition(developer, clip.id)
    const lookFor = [SECRET_RECIPE, SECRET_RECIPE.replace(/ /g, '_'), 'Quillon', 'take3']
    const headers = JSON.stringify(res.headers)
    for (const needle of lookFor) {
      expect(Buffer.from(bytes).includes(Buffer.from(needle)), needle).toBe(false)
      expect(headers.includes(needle), needle).toBe(false)
      expect(String(clip.audioUrl).includes(needle)).toBe(false)
    }
    expect(chunkIds(bytes)).toEqual(['fmt ', 'data'])
    expect(res.headers['content-type']).toBe('audio/wav')
    expect(res.headers['content-disposition']).toBeUndefined()

    // On disk both files carry random names only.
    for (const file of filesUnder(mediaDir)) {
      expect(file.split('/').pop()).toMatch(/^[0-9a-f]{32}\.(wav|flac)$/)
    }
  })

  it('lower a whole matched set when one clip would otherwise peak above −1 dBFS', async () => {
    const performerCode = freshPerformer()
    const steady = await uploaded({ bytes: wav16(tone(3, -6)), fields: { performerCode } })
    expect(steady.renditionLufs as number).toBeCloseTo(-23, 1)
    const before = filesUnder(mediaFolders(mediaDir).renditions).length

    // A quiet ring-out with a sharp attack: at −23 LUFS its peak would rise above −1 dBFS.
    const spiky = synth.pluckedNote({ f0: 440, t60: 0.05, seconds: 3, peakDbfs: -1 })
    const overshoot = samplePeakDbfs([spiky]) + (-23 - integratedLoudness([spiky], RATE)) + 1
    expect(overshoot).toBeGreaterThan(2)
    const joined = await uploaded({
      bytes: wav16(spiky),
      fields: { performerCode, recipeId: recipes.violinA2 },
    })

    const again = (await developer.get(`/api/clips/${steady.id}`)).body.clip
    expect(again.renditionGainDb).toBeCloseTo(steady.renditionGainDb - overshoot, 1)
    expect(again.renditionLufs).toBeCloseTo(joined.renditionLufs as number, 2)
    const a = await rendition(developer, steady.id)
    const b = await rendition(developer, joined.id)
    const la = integratedLoudness(a.audio.channels, RATE)
    const lb = integratedLoudness(b.audio.channels, RATE)
    expect(Math.abs(la - lb)).toBeLessThan(0.1)
    expect(la).toBeCloseTo(-23 - overshoot, 1)
    expect(samplePeakDbfs(b.audio.channels)).toBeLessThanOrEqual(-1 + 0.01)
    // The replaced rendition is gone: one new file for the new clip, one swapped.
    expect(filesUnder(mediaFolders(mediaDir).renditions).length).toBe(before + 1)

    // When the loud clip leaves, the set goes back up to the target.
    expect((await developer.delete(`/api/clips/${joined.id}`)).status).toBe(200)
    const after = (await developer.get(`/api/clips/${steady.id}`)).body.clip
    expect(after.renditionLufs).toBeCloseTo(-23, 1)
    expect(filesUnder(mediaFolders(mediaDir).renditions).length).toBe(before)
  })

  it('are served with byte ranges so players can seek', async () => {
    const clip = await uploaded({ bytes: wav16(), fields: { performerCode: freshPerformer() } })
    const full = await developer.get(`/api/clips/${clip.id}/audio`).buffer(true)
    expect(full.headers['accept-ranges']).toBe('bytes')
    const size = (full.body as Buffer).length

    const part = await developer
      .get(`/api/clips/${clip.id}/audio`)
      .set('Range', 'bytes=100-199')
      .buffer(true)
    expect(part.status).toBe(206)
    expect(part.headers['content-range']).toBe(`bytes 100-199/${size}`)
    expect((part.body as Buffer).equals((full.body as Buffer).subarray(100, 200))).toBe(true)

    const tail = await developer.get(`/api/clips/${clip.id}/audio`).set('Range', `bytes=${size}-`)
    expect(tail.status).toBe(416)
  })
})

describe('who may do what', () => {
  it('lets an analyst list, read and play clips, but not upload, change or download originals', async () => {
    const clip = await uploaded({ bytes: wav16() })
    expect((await analyst.get('/api/clips')).status).toBe(200)
    expect((await analyst.get(`/api/clips/${clip.id}`)).status).toBe(200)
    expect((await analyst.get(`/api/clips/${clip.id}/audio`)).status).toBe(200)
    expect((await analyst.get(`/api/clips/${clip.id}/original`)).status).toBe(403)
    expect((await upload(analyst, { bytes: wav16() })).status).toBe(403)
    expect((await analyst.patch(`/api/clips/${clip.id}`).send({ notes: 'x' })).status).toBe(403)
    expect((await analyst.delete(`/api/clips/${clip.id}`)).status).toBe(403)
  })

  it('refuses anonymous callers, before any file is written', async () => {
    const before = filesUnder(mediaDir).length
    expect((await request(t.app).get('/api/clips')).status).toBe(401)
    expect((await request(t.app).get('/api/clips/1/audio')).status).toBe(401)
    expect((await upload(request(t.app), { bytes: wav16() })).status).toBe(401)
    expect(filesUnder(mediaDir).length).toBe(before)
  })

  it('gives developers the original as a download under its own name', async () => {
    const bytes = wav16()
    const clip = await uploaded({ bytes, name: 'Cellar session 4.wav' })
    const res = await developer.get(`/api/clips/${clip.id}/original`).buffer(true)
    expect(res.status).toBe(200)
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="Cellar session 4.wav"/,
    )
    expect((res.body as Buffer).equals(Buffer.from(bytes))).toBe(true)
  })
})

// --- bad input ------------------------------------------------------------------------------

/** A header claiming 10 GB of samples (RF64, EBU Tech 3306: the size lives in ds64). */
function tenGigabyteHeader(): Uint8Array {
  const wav = wav16(tone(0.1))
  const ds64 = new Uint8Array(8 + 28)
  const d = new DataView(ds64.buffer)
  ds64.set(new TextEncoder().encode('ds64'))
  d.setUint32(4, 28, true)
  const size = 10 * 2 ** 30
  d.setUint32(16, size % 2 ** 32, true)
  d.setUint32(20, Math.floor(size / 2 ** 32), true)
  const out = concatBytes([wav.subarray(0, 12), ds64, wav.subarray(12)])
  out.set(new TextEncoder().encode('RF64'))
  const view = new DataView(out.buffer)
  view.setUint32(4, 0xffffffff, true)
  view.setUint32(12 + ds64.length + 24 + 4, 0xffffffff, true) // the data chunk's size field
  return out
}

const flac = encodeFlac([tone()], RATE, { bitDepth: 16 })
const BAD: [string, Upload, number, RegExp][] = [
  [
    'a text file renamed .wav',
    { bytes: new TextEncoder().encode('Tension notes\nA4 56 N\n'), name: 'notes.wav' },
    422,
    /not a WAV or FLAC recording/,
  ],
  ['a WAV header with no data', { bytes: wav16().subarray(0, 44) }, 422, /no samples/],
  [
    'a truncated FLAC',
    { bytes: flac.subarray(0, flac.length >> 1), name: 'cut.flac', contentType: 'audio/flac' },
    422,
    /promises \d+ samples per channel but holds \d+/,
  ],
  ['a 0-byte file', { bytes: new Uint8Array() }, 422, /empty/],
  ['a WAV header claiming 10 GB', { bytes: tenGigabyteHeader() }, 422, /limit is 600 s/],
  [
    'a name with ../',
    { bytes: wav16(), name: '../../etc/take.wav', raw: true },
    422,
    /folder path/,
  ],
  [
    'a name with control characters',
    { bytes: wav16(), name: 'take\u0007one.wav', raw: true },
    422,
    /control characters/,
  ],
  [
    'a name with control characters straight in the part header',
    { bytes: wav16(), name: 'take\u0007one.wav', raw: true, literalName: true },
    400,
    /part header is malformed/,
  ],
  [
    'a wrong content type',
    { bytes: wav16(), name: 'take.wav', contentType: 'text/plain' },
    422,
    /text\/plain are not accepted/,
  ],
  [
    'a file over the size limit',
    { bytes: wav16(new Float32Array(RATE * 23)) },
    413,
    /larger than the upload limit of 2 MB/,
  ],
  ['a silent recording', { bytes: wav16(new Float32Array(RATE)) }, 422, /silent/],
  [
    'a recording over ten minutes',
    { bytes: encodeWav([new Float32Array(1000 * 601).fill(0.1)], 1000, { bitDepth: 8 }) },
    422,
    /limit is 600 s/,
  ],
]

describe('a refused upload leaves nothing behind', () => {
  it.each(BAD)('%s', async (_label, u, status, message) => {
    const files = filesUnder(mediaDir)
    const count = await clipCount()

    const res = await upload(developer, u)

    expect(res.status, JSON.stringify(res.body)).toBe(status)
    expect(res.body.error.message).toMatch(message)
    expect(filesUnder(mediaDir)).toEqual(files)
    expect(await clipCount()).toBe(count)
  })

  it('names every wrong field and stores nothing', async () => {
    const files = filesUnder(mediaDir)
    const res = await upload(developer, {
      bytes: wav16(),
      fields: { performerCode: 'P 1', kind: 'sung', recordedOn: '2026-02-30', recipeId: 99999 },
    })
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields).sort()).toEqual([
      'kind',
      'performerCode',
      'recordedOn',
    ])
    const unknown = await upload(developer, { bytes: wav16(), fields: { recipeId: 99999 } })
    expect(unknown.body.error.fields.recipeId).toEqual(['No such recipe'])
    expect(filesUnder(mediaDir)).toEqual(files)
  })
})

// --- manifests ------------------------------------------------------------------------------

function batch(manifest: string, files: [string, Uint8Array][]) {
  let req = developer.post('/api/clips/batch').attach('manifest', Buffer.from(manifest), {
    filename: 'manifest.csv',
    contentType: 'text/csv',
  })
  for (const [name, bytes] of files)
    req = req.attach('files', Buffer.from(bytes), { filename: name, contentType: 'audio/wav' })
  return req
}

describe('uploading with a manifest', () => {
  const header = 'file,recipe,excerpt,performer_code,instrument_code,kind,strings_age_days,notes'
  const rows = [
    'a.wav,Testbed A plain,open string,pm-1,vn-7,bowed,3,first',
    'b.flac,Testbed A damped,Open String,PM-1,VN-7,bowed,,',
    'c.wav,Testbed A damped,pluck ring-out,PM-1,VN-7,plucked,12,',
  ]
  const files = (): [string, Uint8Array][] => [
    ['a.wav', wav16()],
    ['b.flac', encodeFlac([tone()], RATE, { bitDepth: 24 })],
    ['c.wav', wav16(synth.pluckedNote({ f0: 440, t60: 1, seconds: 2, delaySeconds: 0.1 }))],
  ]

  it('refuses the whole manifest when some rows are wrong, naming every row to fix', async () => {
    const before = filesUnder(mediaDir)
    const count = await clipCount()
    const broken = files()
    broken[2] = ['c.wav', new TextEncoder().encode('not audio at all')]
    const manifest = [
      header,
      rows[0],
      rows[1].replace('Testbed A damped', 'No such string'),
      rows[2],
      'd.wav,Testbed A plain,scale,PM-1,VN-7,bowed,,',
    ].join('\n')

    const res = await batch(manifest, broken)

    expect(res.status).toBe(422)
    expect(res.body.error.message).toMatch(/3 of 4 rows have problems; nothing was stored/)
    const byRow = Object.fromEntries(
      (res.body.error.rows as { row: number; errors: string[] }[]).map((r) => [r.row, r.errors]),
    )
    expect(Object.keys(byRow)).toEqual(['3', '4', '5'])
    expect(byRow[3]).toEqual(['recipe: no recipe of this name'])
    expect(byRow[4][0]).toMatch(/^file: The file is not a WAV or FLAC recording/)
    expect(byRow[5]).toEqual(['file: d.wav was not among the files sent'])
    expect(filesUnder(mediaDir)).toEqual(before)
    expect(await clipCount()).toBe(count)
  })

  it('refuses files the manifest does not name', async () => {
    const before = filesUnder(mediaDir)
    const res = await batch([header, rows[0]].join('\n'), files().slice(0, 2))
    expect(res.status).toBe(422)
    expect(res.body.error.message).toMatch(/the manifest does not name b.flac/)
    expect(filesUnder(mediaDir)).toEqual(before)
  })

  it('stores every file of a correct manifest, with recipe and excerpt found by name', async () => {
    const res = await batch([header, ...rows].join('\r\n'), files())
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const clips = res.body.clips as Record<string, unknown>[]
    expect(clips.map((c) => [c.originalName, c.recipeName, c.excerptName, c.kind])).toEqual([
      ['a.wav', 'Testbed A plain', 'open string', 'bowed'],
      ['b.flac', 'Testbed A damped', 'open string', 'bowed'],
      ['c.wav', 'Testbed A damped', 'pluck ring-out', 'plucked'],
    ])
    expect(clips[0]).toMatchObject({
      performerCode: 'PM-1',
      instrumentCode: 'VN-7',
      stringsAgeDays: 3,
    })
    expect(clips[2].t60S as number).toBeCloseTo(1, 1)
    expect(filesUnder(mediaFolders(mediaDir).incoming)).toEqual([])
  })
})

// --- the library ----------------------------------------------------------------------------

describe('the clip library', () => {
  it('filters by recipe, excerpt, performer and kind', async () => {
    const performerCode = freshPerformer()
    await uploaded({ bytes: wav16(), fields: { performerCode } })
    await uploaded({ bytes: wav16(), fields: { performerCode, recipeId: recipes.violinA2 } })
    const list = async (q: Record<string, string | number>) =>
      ((await analyst.get('/api/clips').query(q)).body.clips as { recipeId: number }[]).length
    expect(await list({ performerCode: performerCode.toLowerCase() })).toBe(2)
    expect(await list({ performerCode, recipeId: recipes.violinA2 })).toBe(1)
    expect(await list({ performerCode, kind: 'plucked' })).toBe(0)
    expect(await list({ performerCode, excerptId: excerpts['open string'] })).toBe(2)
  })

  it('shows which matched sets hold every recipe of their instrument and string', async () => {
    const performerCode = freshPerformer()
    await uploaded({ bytes: wav16(), fields: { performerCode, instrumentCode: 'VN-SET' } })
    await uploaded({
      bytes: wav16(),
      fields: { performerCode, instrumentCode: 'VN-SET', excerptId: excerpts.scale },
    })
    await uploaded({
      bytes: wav16(),
      fields: { performerCode, instrumentCode: 'VN-SET', recipeId: recipes.violinA2 },
    })
    const { sections } = (await analyst.get('/api/clips/matched-sets')).body
    const violinA = sections.find(
      (s: { instrument: string; stringName: string }) =>
        s.instrument === 'violin' && s.stringName === 'A',
    )
    const ids = violinA.recipes.map((r: { id: number }) => r.id)
    expect(ids).toEqual(expect.arrayContaining([recipes.violinA, recipes.violinA2]))
    const mine = violinA.sets.filter(
      (s: { performerCode: string }) => s.performerCode === performerCode,
    )
    expect(mine.map((s: { excerptName: string }) => s.excerptName).sort()).toEqual([
      'open string',
      'scale',
    ])
    const open = mine.find((s: { excerptName: string }) => s.excerptName === 'open string')
    expect(open.cells[recipes.violinA]).toHaveLength(1)
    expect(open.cells[recipes.violinA2]).toHaveLength(1)
    // Complete only if every recipe recorded in this section is there (the secret one is not).
    expect(open.complete).toBe(ids.every((id: number) => open.cells[id]?.length))
    expect(mine.find((s: { excerptName: string }) => s.excerptName === 'scale').complete).toBe(
      false,
    )
  })

  it('edits fields, re-measures on a change of kind, and audits the change', async () => {
    const clip = await uploaded({ bytes: wav16(), fields: { performerCode: freshPerformer() } })
    const res = await saveEdit(developer, `/api/clips/${clip.id}`, {
      notes: 'bow changed mid-take',
      kind: 'plucked',
      performerCode: freshPerformer(),
    })
    expect(res.status).toBe(200)
    expect(res.body.clip).toMatchObject({ notes: 'bow changed mid-take', kind: 'plucked' })
    expect(res.body.clip.attackS).toBeNull()
    const audit = await t
      .knex('audit_log')
      .where({ action: 'clips.updated' })
      .orderBy('id', 'desc')
      .first()
    expect(JSON.parse(audit.details).fields.sort()).toEqual(['kind', 'notes', 'performerCode'])
  })

  it('deletes a clip with its two files and audits upload and deletion', async () => {
    const before = filesUnder(mediaDir).length
    const clip = await uploaded({ bytes: wav16(), fields: { performerCode: freshPerformer() } })
    expect(filesUnder(mediaDir).length).toBe(before + 2)
    expect((await developer.delete(`/api/clips/${clip.id}`)).status).toBe(200)
    expect(filesUnder(mediaDir).length).toBe(before)
    expect((await developer.get(`/api/clips/${clip.id}`)).status).toBe(404)
    const actions = (
      await t.knex('audit_log').where({ target_type: 'clip', target_id: String(clip.id) })
    ).map((a: { action: string }) => a.action)
    expect(actions).toEqual(['clips.uploaded', 'clips.deleted'])
  })
})

describe('excerpts', () => {
  it('start with the base list and grow by developers, not analysts', async () => {
    expect(Object.keys(excerpts)).toEqual(
      expect.arrayContaining(['open string', 'scale', 'phrase', 'pluck ring-out']),
    )
    const added = await developer
      .post('/api/excerpts')
      .send({ name: 'bow changes at the frog', description: 'Eight slow bow changes' })
    expect(added.status).toBe(201)
    expect(
      (await developer.post('/api/excerpts').send({ name: 'Bow Changes at the frog' })).status,
    ).toBe(409)
    expect((await analyst.post('/api/excerpts').send({ name: 'spiccato run' })).status).toBe(403)

    const retired = await developer
      .patch(`/api/excerpts/${added.body.excerpt.id}`)
      .send({ active: false })
    expect(retired.body.excerpt.active).toBe(false)
    const res = await upload(developer, {
      bytes: wav16(),
      fields: { excerptId: added.body.excerpt.id },
    })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.excerptId[0]).toMatch(/retired/)
  })
})

describe('the demo recordings', () => {
  it('differ by recipe as the recipes do: less damping rings longer and sounds brighter', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'ringdown-demo-clips-'))
    try {
      const before = await clipCount()
      const n = await seedDemoClips({
        knex: t.knex,
        folders: mediaFolders(dir),
        clock: systemClock,
      })
      expect(n).toBeGreaterThanOrEqual(24)
      expect(await clipCount()).toBe(before + n)
      const measure = async (recipe: string, excerpt: string) =>
        t
          .knex('clips as c')
          .join('recipes as r', 'r.id', 'c.recipe_id')
          .join('excerpts as e', 'e.id', 'c.excerpt_id')
          .where({ 'r.name': recipe, 'e.name': excerpt, 'c.performer_code': 'PF-01' })
          .first('c.centroid_hz', 'c.t60_s', 'c.attack_s', 'c.duration_s', 'c.sample_rate')
      const bare = await measure('Aurel A bare', 'pluck ring-out')
      const heavy = await measure('Aurel A heavy compound', 'pluck ring-out')
      expect(bare.t60_s).toBeGreaterThan(heavy.t60_s * 1.5)
      expect(bare.centroid_hz).toBeGreaterThan(heavy.centroid_hz)
      const bareBowed = await measure('Aurel A bare', 'open string')
      const heavyBowed = await measure('Aurel A heavy compound', 'open string')
      expect(bareBowed.centroid_hz).toBeGreaterThan(heavyBowed.centroid_hz * 1.3)
      expect(bareBowed.attack_s).toBeGreaterThan(heavyBowed.attack_s)
      expect(bareBowed.duration_s).toBeGreaterThanOrEqual(3)
      expect(bareBowed.duration_s).toBeLessThanOrEqual(6)
      expect(filesUnder(dir)).toHaveLength(2 * n)
    } finally {
      rmSync(dir, { recursive: true, force: true })
    }
  }, 60_000)
})
