import { createHash } from 'node:crypto'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { encodeWav, infoListChunk, synth } from '../../server/audio/index.ts'
import { systemClock } from '../../server/clock'
import { seedDemoClips } from '../../seeds/demo/clips'
import { seedDemoSessions } from '../../seeds/demo/sessions'
import { mediaFolders } from '../../server/clips/storage'
import type { RingdownApp } from '../../server/app'
import { buildApp, signInAs, type TestApp } from './helpers'
import { addPlayers, isoDay, openStudy } from './sessionFixtures'
import { answerFor, invitedOf } from './playerFixtures'

// Everything a player can reach, walked with every invitation's link: no response may name a
// recipe, carry a recipe or clip id, or give away an original file name.

interface Seen {
  what: string
  status: number
  headers: Record<string, unknown>
  text: string
  json: unknown
}

const binary = (res: request.Response, done: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => done(null, Buffer.concat(chunks)))
}

/** Walks the whole player path with one link, as the pages would, keeping every response. */
async function walk(app: RingdownApp, token: string): Promise<Seen[]> {
  const seen: Seen[] = []
  const keep = (what: string, res: request.Response) => {
    const bytes = Buffer.isBuffer(res.body) ? res.body.toString('latin1') : ''
    seen.push({
      what,
      status: res.status,
      headers: res.headers,
      text: bytes || res.text || '',
      json: bytes ? null : res.body,
    })
    return res
  }
  const api = () => request(app)
  keep('landing', await api().get('/api/player/invitation').query({ token }))
  keep('state', await api().get('/api/player/state').query({ token }))
  keep('consent', await api().post('/api/player/consent').send({ token }))
  keep(
    'headphone',
    await api().post('/api/player/headphone').send({ token, correct: 6, trials: 6 }),
  )
  keep('level', await api().post('/api/player/level').send({ token }))
  const plan = keep('plan', await api().get('/api/player/plan').query({ token })).body.plan
  const keys: string[] = (plan?.attributes ?? []).map((a: { key: string }) => a.key)
  for (const trial of plan?.trials ?? []) {
    // Two servings of one recording (a triangle's doubled sample) must not be byte-identical.
    const served = new Set<string>()
    for (const clip of trial.clips) {
      const audio = keep('audio', await api().get(clip.audioUrl).buffer(true).parse(binary))
      if (audio.status === 200) served.add(createHash('sha256').update(audio.body).digest('hex'))
      else served.add(`${clip.audioUrl}:${audio.status}`)
      keep(
        'audio range',
        await api().get(clip.audioUrl).set('Range', 'bytes=0-4095').buffer(true).parse(binary),
      )
    }
    if (served.size !== trial.clips.length)
      throw new Error(`trial ${trial.index}: two servings arrived as the same bytes`)
    const put = () =>
      api()
        .put(`/api/player/answers/${trial.index}`)
        .send({ token, answer: answerFor(trial, keys) })
    keep('answer', await put())
    keep('answer again', await put())
    keep(
      'bad answer',
      await api()
        .put(`/api/player/answers/${trial.index}`)
        .send({ token, answer: { kind: 'triangle', odd: 1 } }),
    )
  }
  keep('state at the end', await api().get('/api/player/state').query({ token }))
  return seen
}

interface Secrets {
  names: string[]
  clipIds: Set<number>
}

async function secretsOf(t: TestApp): Promise<Secrets> {
  const recipes: { name: string }[] = await t.knex('recipes').select('name')
  const clips: {
    id: number
    original_name: string
    original_file: string
    rendition_file: string
  }[] = await t.knex('clips').select('id', 'original_name', 'original_file', 'rendition_file')
  const slug = (s: string) => s.toLowerCase().replace(/[^a-z0-9]+/g, '-')
  const names = [
    ...recipes.flatMap((r) => [r.name, slug(r.name), r.name.replace(/ /g, '_')]),
    ...clips.flatMap((c) => [c.original_name, c.original_file, c.rendition_file]),
    ...clips.map((c) => c.original_name.replace(/\.[a-z0-9]+$/i, '')),
  ]
  return {
    names: [...new Set(names)].map((n) => n.toLowerCase()),
    clipIds: new Set(clips.map((c) => c.id)),
  }
}

const FORBIDDEN_KEY = /recipe|clip_?id|original|file|excerpt|performer|repeat|odd_?index|seed/i
const ID_KEY = /(^id$|Id$|_id$|^ref$)/

function keysAndIds(value: unknown, path: string, problems: string[], secrets: Secrets) {
  if (Array.isArray(value)) {
    value.forEach((v, i) => keysAndIds(v, `${path}[${i}]`, problems, secrets))
    return
  }
  if (value === null || typeof value !== 'object') return
  for (const [key, v] of Object.entries(value)) {
    if (FORBIDDEN_KEY.test(key)) problems.push(`${path}.${key}: a key that names hidden facts`)
    if (ID_KEY.test(key) && typeof v === 'number' && secrets.clipIds.has(v))
      problems.push(`${path}.${key}: a clip id`)
    keysAndIds(v, `${path}.${key}`, problems, secrets)
  }
}

function chunkIds(bytes: Buffer): string[] {
  const ids: string[] = []
  for (let at = 12; at + 8 <= bytes.length;) {
    const id = bytes.toString('latin1', at, at + 4)
    const size = bytes.readUInt32LE(at + 4)
    ids.push(id)
    at += 8 + size + (size % 2)
  }
  return ids
}

function problemsIn(seen: Seen[], secrets: Secrets): string[] {
  const problems: string[] = []
  for (const s of seen) {
    const haystack = `${JSON.stringify(s.headers)}\n${s.text}`.toLowerCase()
    for (const name of secrets.names)
      if (haystack.includes(name)) problems.push(`${s.what}: shows "${name}"`)
    keysAndIds(s.json, s.what, problems, secrets)
    if (s.what === 'audio' && s.status === 200) {
      const chunks = chunkIds(Buffer.from(s.text, 'latin1'))
      if (chunks.join(',') !== 'fmt ,data') problems.push(`audio: chunks ${chunks.join(',')}`)
    }
    if (s.headers['content-disposition']) problems.push(`${s.what}: a Content-Disposition`)
    // JSON carries Express's hash of its own body; on audio a validator could pair two servings.
    if (s.what.startsWith('audio') && (s.headers.etag || s.headers['last-modified']))
      problems.push(`${s.what}: a validator`)
  }
  return problems
}

describe('blinding in the demo', () => {
  const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-blinding-'))
  let t: TestApp
  beforeAll(async () => {
    t = await buildApp({ config: { mediaDir } })
    await seedDemoClips({ knex: t.knex, folders: mediaFolders(mediaDir), clock: systemClock })
    await seedDemoSessions(t.app.locals.ctx)
  }, 120_000)
  afterAll(async () => {
    await t.close()
    rmSync(mediaDir, { recursive: true, force: true })
  })

  it('shows every player only blind codes and opaque addresses, on every route', async () => {
    const secrets = await secretsOf(t)
    const sessions: { id: number; format: string; status: string }[] = await t
      .knex('sessions')
      .orderBy('id')
      .select('id', 'format', 'status')
    const seen: Seen[] = []
    let links = 0
    for (const s of sessions)
      for (const inv of await invitedOf(t, s.id)) {
        seen.push(...(await walk(t.app, inv.token)))
        links++
      }

    const audio = seen.filter((s) => s.what === 'audio' && s.status === 200)
    expect(links).toBeGreaterThanOrEqual(16)
    expect(new Set(sessions.map((s) => s.format))).toEqual(
      new Set(['pair', 'rating', 'triangle', 'playtest']),
    )
    expect(audio.length).toBeGreaterThan(50)
    expect(seen.filter((s) => s.what === 'answer' && s.status === 200).length).toBeGreaterThan(50)
    expect(seen.filter((s) => s.status === 410).length).toBeGreaterThan(0)
    expect(secrets.names.length).toBeGreaterThan(50)
    expect(problemsIn(seen, secrets)).toEqual([])
  }, 120_000)

  it('reads back the answers the demo stored before the player pages, in codes', async () => {
    const rating: { id: number } = await t
      .knex('sessions')
      .where({ format: 'rating', status: 'open' })
      .first('id')
    const [, second] = await invitedOf(t, rating.id)
    const answers: number = await t
      .knex('answers')
      .where({ invitation_id: second.id })
      .count({ n: '*' })
      .then((r) => Number(r[0].n))
    const state = await request(t.app).get('/api/player/state').query({ token: second.token })

    expect(state.status).toBe(200)
    expect(state.body.answers).toHaveLength(answers)
    for (const a of state.body.answers) expect(a.answer.kind).toBe('rating')
  })
})

describe('blinding with tell-tale uploads', () => {
  const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-blinding-uploads-'))
  const SECRETS = ['Quorvane Silkcore Alpha', 'Quorvane Silkcore Beta']
  let t: TestApp
  afterAll(async () => {
    await t.close()
    rmSync(mediaDir, { recursive: true, force: true })
  })

  it('keeps names and tags of the uploaded files away from the player', async () => {
    t = await buildApp({ config: { mediaDir } })
    const developer = await signInAs(t.app, 'developer')
    const excerpt = (await developer.get('/api/excerpts')).body.excerpts[0].id
    const recipeIds: number[] = []
    const clipIds: number[] = []
    for (const [i, name] of SECRETS.entries()) {
      const recipe = await developer.post('/api/recipes').send({
        name,
        instrument: 'violin',
        stringName: 'A',
        core: 'synthetic multifilament',
        vibratingLengthMm: 328,
      })
      expect(recipe.status, JSON.stringify(recipe.body)).toBe(201)
      recipeIds.push(recipe.body.recipe.id)
      const tone = synth.bowedTone({
        f0: 440,
        seconds: 0.6 + i * 0.1,
        attackSeconds: 0.03,
        peakDbfs: -9,
      })
      const bytes = encodeWav([tone], 48_000, {
        bitDepth: 16,
        chunksBeforeData: [infoListChunk({ INAM: name, ICMT: `prototype ${name}` })],
      })
      const clip = await developer
        .post('/api/clips')
        .field('recipeId', recipe.body.recipe.id)
        .field('excerptId', excerpt)
        .field('performerCode', 'PF-Q1')
        .field('instrumentCode', 'VN-Q1')
        .field('kind', 'bowed')
        .attach('file', Buffer.from(bytes), {
          filename: `${name.replace(/ /g, '_')}_take2.wav`,
          contentType: 'audio/wav',
        })
      expect(clip.status, JSON.stringify(clip.body)).toBe(201)
      clipIds.push(clip.body.clip.id)
    }
    const { id } = await openStudy(developer, {
      name: 'Silk core pair',
      format: 'pair',
      recipeIds,
      clipSets: [{ key: 'tell-tale set', clipIds }],
      duplicates: 1,
      allowNoPreference: true,
      deadline: isoDay(new Date(), 5),
    })
    await developer
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: await addPlayers(t.knex, 2) })
    await t.settle()

    const seen: Seen[] = []
    for (const inv of await invitedOf(t, id)) seen.push(...(await walk(t.app, inv.token)))
    const secrets = await secretsOf(t)

    expect(
      seen.filter((s) => s.what === 'audio' && s.status === 200).length,
    ).toBeGreaterThanOrEqual(4)
    expect(secrets.names).toContain('quorvane_silkcore_alpha_take2.wav')
    expect(problemsIn(seen, secrets)).toEqual([])
  }, 60_000)
})
