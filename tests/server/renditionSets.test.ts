import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  decodeAudio,
  encodeWav,
  integratedLoudness,
  samplePeakDbfs,
  synth,
  writeRenditionWav,
} from '../../server/audio/index.ts'
import { clipDeps } from '../../server/clips/balance'
import { refreshRenditions, setsNeedingRefresh } from '../../server/clips/refreshRenditions'
import { mediaFolders, opaqueName, readOriginal, renditionPath } from '../../server/clips/storage'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { invitedOf } from './playerFixtures'
import { addPlayers, isoDay, openStudy } from './sessionFixtures'

// Renditions of a matched set through the real upload path: one format, one length, one level.

const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-sets-'))
let t: TestApp
let developer: Agent
const recipeIds: number[] = []
const excerpts: Record<string, number> = {}

beforeAll(async () => {
  t = await buildApp({ config: { mediaDir } })
  developer = await signInAs(t.app, 'developer')
  for (const name of ['Setbed plain', 'Setbed damped', 'Setbed fibre', 'Setbed compound']) {
    const res = await developer.post('/api/recipes').send({
      name,
      instrument: 'violin',
      stringName: 'A',
      core: 'synthetic multifilament',
      vibratingLengthMm: 328,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    recipeIds.push(res.body.recipe.id)
  }
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

let performerCounter = 0
const freshPerformer = () => `PS-${++performerCounter}`

async function upload(
  bytes: Uint8Array,
  fields: { recipeId: number; performerCode: string; kind?: 'bowed' | 'plucked' },
): Promise<{ id: number; durationS: number }> {
  const kind = fields.kind ?? 'bowed'
  const res = await developer
    .post('/api/clips')
    .field('recipeId', String(fields.recipeId))
    .field('excerptId', String(excerpts[kind === 'plucked' ? 'pluck ring-out' : 'scale']))
    .field('performerCode', fields.performerCode)
    .field('instrumentCode', 'VN-S1')
    .field('kind', kind)
    .attach('file', Buffer.from(bytes), { filename: 'take.wav', contentType: 'audio/wav' })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body.clip
}

async function rendition(id: number) {
  const res = await developer.get(`/api/clips/${id}/audio`).buffer(true)
  expect(res.status).toBe(200)
  const bytes = new Uint8Array(res.body as Buffer)
  return { bytes, audio: await decodeAudio(bytes) }
}

describe('the level of a rendition', () => {
  it('is −23 LUFS within 0.05 LU for loud plucked ring-outs, measured on the served file', async () => {
    // Loud single-partial ring-outs turned down ~9–10 dB: their tails sink below the −70 LUFS
    // absolute gate of BS.1770-4 (§2.8), so a gain of target minus loudness lands 0.2–0.4 LU
    // loud. EBU R 128 sets −23 LUFS; the 0.05 LU is our own bar, below the meter's ±0.1 LU
    // tolerance in EBU Tech 3341.
    const performerCode = freshPerformer()
    for (const [i, t60] of [3, 5].entries()) {
      const note = synth.pluckedNote({ f0: 196, t60, seconds: 20, peakDbfs: -0.5, harmonics: 1 })
      const clip = await upload(encodeWav([note], 48_000, { bitDepth: 24 }), {
        recipeId: recipeIds[i],
        performerCode,
        kind: 'plucked',
      })
      const { audio } = await rendition(clip.id)
      const lufs = integratedLoudness(audio.channels, audio.sampleRate)
      expect(Math.abs(lufs + 23), `T60 ${t60} s reads ${lufs.toFixed(3)} LUFS`).toBeLessThan(0.05)
      expect(samplePeakDbfs(audio.channels)).toBeLessThanOrEqual(-1)
    }
  }, 60_000)
})

const tone = (seconds: number, sampleRate: number) =>
  synth.bowedTone({ f0: 220, seconds, attackSeconds: 0.05, peakDbfs: -9, sampleRate })

interface Take {
  rate: number
  channels: 1 | 2
  bits: 16 | 24
  seconds: number
}

/** Takes of one set in different formats and lengths; the 44.1 kHz one is the shortest. */
const MIXED: Take[] = [
  { rate: 44_100, channels: 1, bits: 16, seconds: 5 },
  { rate: 48_000, channels: 2, bits: 16, seconds: 20 },
  { rate: 96_000, channels: 1, bits: 24, seconds: 12 },
  { rate: 48_000, channels: 2, bits: 24, seconds: 8 },
]

async function uploadMixed(performerCode: string) {
  const ids: number[] = []
  for (const [i, take] of MIXED.entries()) {
    const mono = tone(take.seconds, take.rate)
    const channels = take.channels === 1 ? [mono] : [mono, mono.map((v) => v * 0.9)]
    const bytes = encodeWav(channels, take.rate, { bitDepth: take.bits })
    ids.push((await upload(bytes, { recipeId: recipeIds[i], performerCode })).id)
  }
  return ids
}

const header = (bytes: Uint8Array) => Buffer.from(bytes.subarray(0, 44)).toString('hex')

describe('the renditions of a matched set', () => {
  it('share one header and one length, whatever rate, channels and bits the takes had', async () => {
    const ids = await uploadMixed(freshPerformer())

    const served = await Promise.all(ids.map(rendition))
    // The set format: 48 kHz (the highest rate, capped), stereo (the most channels), 24-bit (one
    // take is deeper than 16), 5 s (the shortest take): 240 000 frames, 1 440 000 data bytes.
    expect(new Set(served.map((r) => header(r.bytes))).size).toBe(1)
    for (const { bytes, audio } of served) {
      expect(bytes.length).toBe(44 + 240_000 * 2 * 3)
      expect(audio).toMatchObject({ sampleRate: 48_000, bitDepth: 24 })
      expect(audio.channels).toHaveLength(2)
      expect(Math.abs(integratedLoudness(audio.channels, 48_000) + 23)).toBeLessThan(0.05)
    }
    const rows = await t
      .knex('clips')
      .whereIn('id', ids)
      .select(
        'rendition_sample_rate as rate',
        'rendition_channels as channels',
        'rendition_bit_depth as bits',
        'rendition_duration_s as seconds',
        'rendition_loudness_lufs as lufs',
      )
    for (const r of rows) {
      expect(r).toMatchObject({ rate: 48_000, channels: 2, bits: 24, seconds: 5 })
      expect(Math.abs(r.lufs + 23)).toBeLessThan(0.05)
    }
  }, 60_000)

  it('reach the player as servings of one length, each with its own bytes', async () => {
    const ids = await uploadMixed(freshPerformer())
    const { id } = await openStudy(developer, {
      name: 'Mixed formats pair',
      format: 'pair',
      recipeIds,
      clipSets: [{ key: 'mixed', clipIds: ids }],
      deadline: isoDay(new Date(), 5),
    })
    await developer
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: await addPlayers(t.knex, 1) })
    await t.settle()
    const [player] = await invitedOf(t, id)
    await request(t.app).post('/api/player/consent').send({ token: player.token }).expect(200)
    const plan = (
      await request(t.app).get('/api/player/plan').set('X-Invitation-Token', player.token)
    ).body.plan
    for (const trial of plan.trials as { clips: { audioUrl: string }[] }[]) {
      const bytes = await Promise.all(
        trial.clips.map(
          async (c) => new Uint8Array((await request(t.app).get(c.audioUrl).buffer(true)).body),
        ),
      )
      expect(new Set(bytes.map((b) => b.length)).size).toBe(1)
      expect(new Set(bytes.map(header)).size).toBe(1)
      expect(Buffer.from(bytes[0]).equals(Buffer.from(bytes[1]))).toBe(false)
    }
  }, 60_000)
})

describe('a take joining a set of its own format', () => {
  it('lowers the set when its peak needs it, and leaves the others alone when not', async () => {
    const performerCode = freshPerformer()
    const files = async (ids: number[]) =>
      t.knex('clips').whereIn('id', ids).orderBy('id').pluck('rendition_file')
    const a = await upload(encodeWav([tone(3, 48_000)], 48_000, { bitDepth: 16 }), {
      recipeId: recipeIds[0],
      performerCode,
    })
    // A short sharp pluck: at −23 LUFS its peak would go far above −1 dBFS.
    const spiky = synth.pluckedNote({ f0: 440, t60: 0.05, seconds: 3, peakDbfs: -1 })
    const b = await upload(encodeWav([spiky], 48_000, { bitDepth: 16 }), {
      recipeId: recipeIds[1],
      performerCode,
    })
    const lowered = await Promise.all([a.id, b.id].map(rendition))
    const [la, lb] = lowered.map((r) => integratedLoudness(r.audio.channels, 48_000))
    expect(la).toBeLessThan(-24)
    expect(Math.abs(la - lb)).toBeLessThan(0.05)
    expect(samplePeakDbfs(lowered[1].audio.channels)).toBeLessThanOrEqual(-1 + 1e-3)
    const before = await files([a.id, b.id])

    const c = await upload(encodeWav([tone(3, 48_000)], 48_000, { bitDepth: 16 }), {
      recipeId: recipeIds[2],
      performerCode,
    })

    expect(await files([a.id, b.id])).toEqual(before)
    const { audio } = await rendition(c.id)
    expect(Math.abs(integratedLoudness(audio.channels, 48_000) - la)).toBeLessThan(0.05)
  }, 60_000)
})

describe('the designer', () => {
  const sessionBody = (clipIds: number[], ids = recipeIds) => ({
    name: 'Format review',
    playerTitle: 'Listening session',
    format: 'rating',
    recipeIds: ids,
    clipSets: [{ key: 'under review', clipIds }],
    deadline: isoDay(new Date(), 5),
  })

  it('sees each take as recorded, the set as rendered, and where cutting loses sound', async () => {
    const performerCode = freshPerformer()
    const ids = await uploadMixed(performerCode)

    const res = await developer.post('/api/sessions').send(sessionBody(ids))

    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const set = res.body.session.clipSets[0]
    expect(set.format).toEqual({
      originals: MIXED.map((m, i) => ({
        clipId: ids[i],
        sampleRate: m.rate,
        channels: m.channels,
        bitDepth: m.bits,
        durationS: m.seconds,
      })),
      rendition: { sampleRate: 48_000, channels: 2, bitDepth: 24, durationS: 5 },
      takes: 4,
      written: true,
    })
    const label = `Set 'scale · ${performerCode} · VN-S1'`
    // The bowed takes sound to their last sample, so all that is cut is sound (computed).
    // One warning for the set, longest cut first.
    expect(res.body.session.warnings).toEqual([
      `${label}: trimming to 5.0 s (the shortest take, clip ${ids[0]}) cuts ` +
        [
          [1, 15],
          [2, 7],
          [3, 3],
        ]
          .map(
            ([i, cut]) =>
              `${cut}.0 s of sound from clip ${ids[i]} (Setbed ${['plain', 'damped', 'fibre', 'compound'][i]})`,
          )
          .join(', '),
    ])
  }, 60_000)

  it('hears nothing cut from a ring-out that has died away, and the rest of one that has not', async () => {
    const performerCode = freshPerformer()
    const ring = (t60: number, seconds: number) =>
      synth.pluckedNote({ f0: 196, t60, seconds, peakDbfs: -6, harmonics: 1 })
    const short = await upload(encodeWav([ring(1.5, 2)], 48_000, { bitDepth: 16 }), {
      recipeId: recipeIds[0],
      performerCode,
      kind: 'plucked',
    })
    const dead = await upload(encodeWav([ring(0.8, 10)], 48_000, { bitDepth: 16 }), {
      recipeId: recipeIds[1],
      performerCode,
      kind: 'plucked',
    })
    const ringing = await upload(encodeWav([ring(8, 10)], 48_000, { bitDepth: 16 }), {
      recipeId: recipeIds[2],
      performerCode,
      kind: 'plucked',
    })

    const res = await developer
      .post('/api/sessions')
      .send(sessionBody([short.id, dead.id, ringing.id], recipeIds.slice(0, 3)))

    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const warnings = res.body.session.warnings as string[]
    expect(warnings.some((w) => w.includes(`clip ${dead.id} `))).toBe(false)
    const cut = warnings.find((w) => w.includes(`clip ${ringing.id} `))
    expect(cut).toBeDefined()
    // The envelope of e^(−t/τ) falls 60 dB per T60, so the peak of a take starting at −6 dBFS
    // reaches the line of sound, 27 dB below its loudness, at t = (−6 − L + 27)·T60/60 (computed).
    const lufs = (await developer.get(`/api/clips/${ringing.id}`)).body.clip.loudnessLufs
    const expected = ((-6 - lufs + 27) * 8) / 60 - 2
    const said = Number(/cuts ([\d.]+) s of sound/.exec(cut!)![1])
    expect(Math.abs(said - expected)).toBeLessThan(0.1)
  })

  it('is refused a set that cannot be brought to one format, at the clip-set field', async () => {
    // Takes stored before the minimum length, and a stereo take in a set with a four-channel one.
    const performerCode = freshPerformer()
    const excerptId = excerpts.scale
    const now = new Date().toISOString()
    const legacy = async (recipeId: number, channels: number, seconds: number) => {
      const [id] = await t.knex('clips').insert({
        recipe_id: recipeId,
        excerpt_id: excerptId,
        performer_code: performerCode,
        instrument_code: 'VN-S9',
        kind: 'bowed',
        original_name: 'old take.wav',
        original_file: opaqueName('wav'),
        rendition_file: opaqueName('wav'),
        rendition_gain_db: 0,
        container: 'wav',
        duration_s: seconds,
        sample_rate: 48_000,
        channels,
        bit_depth: 16,
        peak_dbfs: -6,
        loudness_lufs: -23,
        created_at: now,
        updated_at: now,
      })
      return id as number
    }
    const ids = [
      await legacy(recipeIds[0], 2, 4),
      await legacy(recipeIds[1], 4, 4),
      await legacy(recipeIds[2], 1, 0.3),
    ]

    const res = await developer.post('/api/sessions').send(sessionBody(ids, recipeIds.slice(0, 3)))

    expect(res.status).toBe(422)
    const label = `Set 'scale · ${performerCode} · VN-S9'`
    expect(res.body.error.fields.clipSets).toEqual([
      `${label} cannot be brought to one length: its shortest take, clip ${ids[2]} (Setbed fibre), ` +
        'lasts 0.30 s, and every rendition of a set is cut to its shortest take; a set needs at ' +
        'least 0.5 s. Delete that take or record it again.',
      `${label} cannot be brought to one format: clip ${ids[0]} (Setbed plain) is stereo and ` +
        'another take has 4 channels; only a mono take can be spread over more channels.',
    ])
    await t.knex('clips').whereIn('id', ids).delete()
  })

  it('refuses an upload shorter than the shortest set, naming the file', async () => {
    const res = await developer
      .post('/api/clips')
      .field('recipeId', String(recipeIds[0]))
      .field('excerptId', String(excerpts.scale))
      .field('performerCode', freshPerformer())
      .field('instrumentCode', 'VN-S1')
      .field('kind', 'bowed')
      .attach('file', Buffer.from(encodeWav([tone(0.45, 48_000)], 48_000, { bitDepth: 16 })), {
        filename: 'clipped.wav',
        contentType: 'audio/wav',
      })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.file[0]).toMatch(/lasts 0.45 s; a clip must last at least 0.5 s/)
  })
})

describe('renditions made before one format per set', () => {
  it('are made again when the app starts: one format, one level, the old files gone', async () => {
    const performerCode = freshPerformer()
    const ids = await uploadMixed(performerCode)
    const folders = mediaFolders(mediaDir)
    // As they used to be written: each take in its own rate, channels and length, at the gain of
    // target minus loudness, with nothing of the new facts.
    const old: string[] = []
    for (const id of ids) {
      const row = await t.knex('clips').where({ id }).first()
      const audio = await decodeAudio(await readOriginal(folders, row.original_file))
      const file = opaqueName('wav')
      const bytes = writeRenditionWav(audio.channels, audio.sampleRate, {
        bitDepth: row.bit_depth <= 16 ? 16 : 24,
        gainDb: -23 - row.loudness_lufs,
      })
      writeFileSync(renditionPath(folders, file), bytes)
      old.push(file)
      await t
        .knex('clips')
        .where({ id })
        .update({
          rendition_file: file,
          rendition_gain_db: -23 - row.loudness_lufs,
          rendition_sample_rate: null,
          rendition_channels: null,
          rendition_bit_depth: null,
          rendition_duration_s: null,
          rendition_loudness_lufs: null,
        })
    }
    const key = { excerptId: excerpts.scale, performerCode, instrumentCode: 'VN-S1' }
    expect(await setsNeedingRefresh(t.knex)).toContainEqual(key)
    expect(new Set((await Promise.all(ids.map(rendition))).map((r) => header(r.bytes))).size).toBe(
      4,
    )

    const result = await refreshRenditions(clipDeps(t.app.locals.ctx))

    expect(result.failed).toEqual([])
    expect(result.refreshed).toBeGreaterThanOrEqual(1)
    expect(await setsNeedingRefresh(t.knex)).not.toContainEqual(key)
    const served = await Promise.all(ids.map(rendition))
    expect(new Set(served.map((r) => header(r.bytes))).size).toBe(1)
    for (const { bytes, audio } of served) {
      expect(bytes.length).toBe(44 + 240_000 * 2 * 3)
      expect(Math.abs(integratedLoudness(audio.channels, 48_000) + 23)).toBeLessThan(0.05)
    }
    for (const file of old) expect(existsSync(renditionPath(folders, file))).toBe(false)
    // A set whose levels disagree is found again.
    await t.knex('clips').where({ id: ids[0] }).update({ rendition_loudness_lufs: -22.8 })
    expect(await setsNeedingRefresh(t.knex)).toContainEqual(key)
    expect((await refreshRenditions(clipDeps(t.app.locals.ctx))).failed).toEqual([])
    expect(await setsNeedingRefresh(t.knex)).toEqual([])
  }, 60_000)

  it('leaves a set it cannot re-make as it was, reports it, and goes on with the others', async () => {
    const broken = freshPerformer()
    const ids = await uploadMixed(broken)
    const other = freshPerformer()
    const fine = await upload(encodeWav([tone(3, 48_000)], 48_000, { bitDepth: 16 }), {
      recipeId: recipeIds[0],
      performerCode: other,
    })
    const row = await t.knex('clips').where({ id: ids[1] }).first()
    rmSync(join(mediaFolders(mediaDir).originals, row.original_file))
    await t
      .knex('clips')
      .whereIn('id', [...ids, fine.id])
      .update({ rendition_loudness_lufs: null })
    const before = await t.knex('clips').whereIn('id', ids).orderBy('id').pluck('rendition_file')

    const result = await refreshRenditions(clipDeps(t.app.locals.ctx))

    expect(result.failed.map((f) => f.key)).toEqual([
      { excerptId: excerpts.scale, performerCode: broken, instrumentCode: 'VN-S1' },
    ])
    expect(await t.knex('clips').whereIn('id', ids).orderBy('id').pluck('rendition_file')).toEqual(
      before,
    )
    expect(
      (await t.knex('clips').where({ id: fine.id }).first()).rendition_loudness_lufs,
    ).toBeCloseTo(-23, 1)
    await t.knex('clips').whereIn('id', ids).delete()
  }, 60_000)
})
