import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { encodeWav, infoListChunk, synth } from '../../server/audio/index.ts'
import { systemClock } from '../../server/clock'
import { seedDemoClips } from '../../seeds/demo/clips'
import { seedDemoSessions } from '../../seeds/demo/sessions'
import { mediaFolders } from '../../server/clips/storage'
import { loadSession } from '../../server/sessions/rows'
import { servedTrials } from '../../server/sessions/servedRecord'
import { servingsOf } from '../../server/formats/answers'
import type { MountedTable } from '../../server/app'
import { SESSION_FORMATS } from '../../shared/schemas/sessions'
import type { PlayerState } from '../../shared/schemas/rating'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addPlayers, isoDay, openStudy } from './sessionFixtures'
import { invitedOf } from './playerFixtures'
import { playerReachable, walk, type Seen, type Walked } from './blinding/walk'
import {
  formatProblems,
  mailsTo,
  secretsOf,
  textProblems,
  twinProblems,
  type Secrets,
} from './blinding/checks'

// Everything a player can reach, walked with every invitation's link, for the demo and for
// sessions built here in every format from recordings that differ in rate, channels, depth and
// length: no response, page, script or mail may name a recipe or carry its facts; no served
// clip has a picture of its own; the servings of a trial agree in header and length; and no two
// servings of one recipe decode to the same samples unless the designer accepted that.

const DIST = resolve(import.meta.dirname, '../../dist')

/** Picks the quiet tone of each headphone trial the server dealt, as a player who hears it. */
function passHeadphones(start: unknown): Record<string, unknown> {
  const s = start as { attempt: number; trials: { tones: string[] }[] } | null
  return {
    attempt: s?.attempt ?? 1,
    responses: (s?.trials ?? []).map((t) => t.tones.indexOf('quiet')),
  }
}

interface Audit {
  walks: Walked[]
  problems: string[]
  twinPairs: number
  highestTwin: number
}

async function audit(t: TestApp, sessionIds: number[]): Promise<Audit> {
  const tables: MountedTable[] = t.app.locals.tables
  const problems: string[] = []
  const walks: Walked[] = []
  let twinPairs = 0
  let highestTwin = -1
  const global = await secretsOf(t.knex, [])
  for (const id of sessionIds) {
    const session = await loadSession(t.knex, id)
    const secrets: Secrets = { ...global, words: (await secretsOf(t.knex, [id])).words }
    const invited = await invitedOf(t, id)
    for (const inv of invited) {
      const walked = await walk(t.app, tables, inv.token, passHeadphones)
      walks.push(walked)
      const label = (p: string) => `session ${id} (${session.format}), invitation ${inv.id}: ${p}`
      problems.push(...textProblems(walked.seen, secrets).map(label))
      problems.push(...formatProblems(walked.audio).map(label))
      const served = (await servedTrials(t.knex, session, inv.id)).map((trial) => ({
        repeatOf: trial.repeatOf,
        servings: servingsOf(trial).map((c) => ({ code: c.code, recipeId: Number(c.recipeId) })),
      }))
      const accepted = Boolean(
        (await t.knex('sessions').where({ id }).first('same_take_accepted_at'))
          .same_take_accepted_at,
      )
      const twins = twinProblems(walked.audio, served, accepted, {
        repeatsShowTheSame: session.format !== 'triangle',
      })
      problems.push(...twins.problems.map(label))
      twinPairs += twins.pairs
      highestTwin = Math.max(highestTwin, twins.highest)
    }
    const emails: { email: string }[] = await t
      .knex('invitations as i')
      .join('players as p', 'p.id', 'i.player_id')
      .where('i.session_id', id)
      .select('p.email')
    const mails = await mailsTo(
      t.knex,
      emails.map((e) => e.email),
    )
    problems.push(...textProblems(mails, secrets).map((p) => `session ${id} mail: ${p}`))
  }
  return { walks, problems, twinPairs, highestTwin }
}

/** The page and every script and style the client build serves, as a player's browser gets them. */
async function pagesAndScripts(t: TestApp): Promise<Seen[]> {
  const seen: Seen[] = []
  const keep = (what: string, res: request.Response) =>
    seen.push({ what, status: res.status, headers: res.headers, text: res.text ?? '', json: null })
  keep('page', await request(t.app).get('/play').query({ token: 'x' }))
  for (const file of readdirSync(join(DIST, 'assets')).filter((f) => /\.(js|css|html)$/.test(f)))
    keep(`asset ${file}`, await request(t.app).get(`/assets/${file}`))
  return seen
}

describe('blinding in the demo', () => {
  const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-blinding-'))
  let t: TestApp
  beforeAll(async () => {
    t = await buildApp({ config: { mediaDir }, serveClient: true })
    await seedDemoClips({ knex: t.knex, folders: mediaFolders(mediaDir), clock: systemClock })
    await seedDemoSessions(t.app.locals.ctx)
  }, 180_000)
  afterAll(async () => {
    await t.close()
    rmSync(mediaDir, { recursive: true, force: true })
  })

  it('shows every player only blind codes, one picture and matching files, on every route', async () => {
    const sessions: { id: number; format: string }[] = await t
      .knex('sessions')
      .orderBy('id')
      .select('id', 'format')
    const result = await audit(
      t,
      sessions.map((s) => s.id),
    )
    const tables: MountedTable[] = t.app.locals.tables
    const reachable = playerReachable(tables).map((r) => `${r.method.toUpperCase()} ${r.path}`)

    expect(result.walks.length).toBeGreaterThanOrEqual(16)
    for (const w of result.walks) expect([...w.routes].sort()).toEqual([...reachable].sort())
    expect(reachable).toContain('GET /api/player/plan')
    expect(new Set(sessions.map((s) => s.format))).toEqual(new Set(SESSION_FORMATS))
    const audio = result.walks.flatMap((w) => w.audio)
    expect(audio.length).toBeGreaterThan(50)
    const answers = result.walks.flatMap((w) =>
      w.seen.filter((s) => s.what === 'PUT /api/player/answers/:trialIndex' && s.status === 200),
    )
    expect(answers.length).toBeGreaterThan(50)
    const checks = result.walks.flatMap((w) =>
      w.seen.filter((s) => s.what === 'POST /api/player/headphone' && s.status === 200),
    )
    // The demo's answering players took the check in the story (a second start is refused);
    // the walk takes it for the five of the open round who had not.
    expect(checks.length).toBeGreaterThanOrEqual(5)
    // So every walk of an open listening session reached the trials with a finished check.
    const ends = result.walks.map((w) => w.seen.at(-1)!.json as PlayerState)
    const listening = ends.filter((s) => s.canAnswer && s.landing.format !== 'playtest')
    expect(listening).toHaveLength(8)
    for (const s of listening) expect(['passed', 'failed']).toContain(s.headphone?.status)

    // The demo's sets hold a second take of every recipe: twins are different recordings.
    expect(result.twinPairs).toBeGreaterThanOrEqual(16)
    expect(result.highestTwin).toBeLessThan(0.999)
    expect(result.problems).toEqual([])
  }, 300_000)

  it('ships a page and scripts that name no recipe', async () => {
    expect(existsSync(join(DIST, 'index.html')), 'build the client first (npm test does)').toBe(
      true,
    )
    const secrets = await secretsOf(t.knex, [])
    const seen = await pagesAndScripts(t)
    expect(seen.length).toBeGreaterThan(3)
    expect(seen.every((s) => s.status === 200)).toBe(true)
    expect(textProblems(seen, { ...secrets, words: [] })).toEqual([])
  })

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
    const state = await request(t.app)
      .get('/api/player/state')
      .set('X-Invitation-Token', second.token)

    expect(state.status).toBe(200)
    expect(state.body.answers).toHaveLength(answers)
    for (const a of state.body.answers) expect(a.answer.kind).toBe('rating')
  })
})

/*
 * Sessions built here in every format from recordings that would each give themselves away:
 * a 44.1 kHz mono take, a 96 kHz stereo 24-bit take, a 48 kHz take a second shorter, and files
 * and tags named after their recipes. Recipes differ in construction words a title might use.
 */
describe('blinding of sessions built in every format', () => {
  const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-blinding-built-'))
  const RECIPES = [
    { name: 'Quorvane Silkcore Alpha', core: 'gut', damping: 'compound' },
    { name: 'Quorvane Silkcore Beta', core: 'synthetic multifilament', damping: 'fibre layer' },
    { name: 'Quorvane Silkcore Gamma', core: 'solid steel', damping: 'none' },
  ]
  const TAKES = [
    [
      { rate: 44_100, channels: 1, bits: 16, seconds: 3.0 },
      { rate: 48_000, channels: 1, bits: 16, seconds: 3.2 },
    ],
    [
      { rate: 96_000, channels: 2, bits: 24, seconds: 3.4 },
      { rate: 96_000, channels: 2, bits: 24, seconds: 3.3 },
    ],
    [
      { rate: 48_000, channels: 1, bits: 16, seconds: 2.6 },
      { rate: 48_000, channels: 2, bits: 16, seconds: 2.9 },
    ],
  ]
  let t: TestApp
  let developer: Agent
  const recipeIds: number[] = []
  const clipIds: number[][] = []
  afterAll(async () => {
    await t.close()
    rmSync(mediaDir, { recursive: true, force: true })
  })

  beforeAll(async () => {
    t = await buildApp({ config: { mediaDir } })
    developer = await signInAs(t.app, 'developer')
    const excerpt = (await developer.get('/api/excerpts')).body.excerpts[0].id
    for (const [r, recipe] of RECIPES.entries()) {
      const made = await developer.post('/api/recipes').send({
        name: recipe.name,
        instrument: 'violin',
        stringName: 'A',
        core: recipe.core,
        dampingKind: recipe.damping,
        vibratingLengthMm: 328,
      })
      expect(made.status, JSON.stringify(made.body)).toBe(201)
      recipeIds.push(made.body.recipe.id)
      clipIds.push([])
      for (const [k, take] of TAKES[r].entries()) {
        // Each take its own performance: a touch off in pitch and bow speed.
        const tone = synth.bowedTone({
          f0: 440 * (1 + 0.002 * k),
          seconds: take.seconds,
          attackSeconds: 0.03 + 0.02 * r + 0.01 * k,
          peakDbfs: -9 - 3 * r,
          sampleRate: take.rate,
        })
        const channels = take.channels === 2 ? [tone, tone.map((v) => v * 0.8)] : [tone]
        const bytes = encodeWav(channels, take.rate, {
          bitDepth: take.bits as 16 | 24,
          chunksBeforeData: [infoListChunk({ INAM: recipe.name, ICMT: `take ${k + 1}` })],
        })
        const clip = await developer
          .post('/api/clips')
          .field('recipeId', made.body.recipe.id)
          .field('excerptId', excerpt)
          .field('performerCode', 'PF-Q1')
          .field('instrumentCode', 'VN-Q1')
          .field('kind', 'bowed')
          .field('notes', 'cardioid pair at two metres, Quorvane loft')
          .attach('file', Buffer.from(bytes), {
            filename: `${recipe.name.replace(/ /g, '_')}_take${k + 1}.wav`,
            contentType: 'audio/wav',
          })
        expect(clip.status, JSON.stringify(clip.body)).toBe(201)
        clipIds[r].push(clip.body.clip.id)
      }
    }
  }, 120_000)

  it('blinds every format, with second takes and with one take accepted', async () => {
    const withTakes = {
      key: 'built set',
      clipIds: clipIds.map((c) => c[0]),
      twinClipIds: clipIds.map((c) => c[1]),
    }
    const oneTake: { key: string; clipIds: number[]; twinClipIds?: number[] } = {
      key: 'built set',
      clipIds: clipIds.map((c) => c[0]),
    }
    const sessionIds: number[] = []
    for (const format of SESSION_FORMATS)
      for (const clipSets of format === 'playtest' ? [[]] : [[withTakes], [oneTake]]) {
        const { id } = await openStudy(
          developer,
          {
            name: `${RECIPES[0].name} against the others (${format})`,
            playerTitle: 'Autumn listening round',
            playerMessage: 'Listen at a comfortable level and answer as you hear it.',
            format,
            recipeIds: format === 'triangle' ? recipeIds.slice(0, 2) : recipeIds,
            clipSets:
              format === 'triangle'
                ? clipSets.map((s) => ({
                    ...s,
                    clipIds: s.clipIds.slice(0, 2),
                    ...(s.twinClipIds ? { twinClipIds: s.twinClipIds.slice(0, 2) } : {}),
                  }))
                : clipSets,
            duplicates: 1,
            allowNoPreference: true,
            deadline: isoDay(new Date(), 5),
          },
          { acceptSameTake: clipSets[0] === oneTake },
        )
        await developer
          .post(`/api/sessions/${id}/invitations`)
          .send({ playerIds: await addPlayers(t.knex, 2) })
        sessionIds.push(id)
      }
    await t.settle()
    const result = await audit(t, sessionIds)

    expect(result.walks).toHaveLength(sessionIds.length * 2)
    expect(result.walks.flatMap((w) => w.audio).length).toBeGreaterThan(40)
    // Answers naming another trial's codes are refused, never stored against this trial.
    const foreign = result.walks.flatMap((w) =>
      w.seen.filter((s) => s.what.endsWith("another trial's code")),
    )
    expect(foreign.length).toBeGreaterThan(10)
    expect(foreign.filter((s) => s.status !== 422)).toEqual([])
    // One-take sessions serve twins that correlate almost perfectly: accepted, so allowed.
    expect(result.highestTwin).toBeGreaterThan(0.999)
    expect(result.problems).toEqual([])
  }, 300_000)

  it('finds what it is looking for when blinding fails', async () => {
    // The checks themselves, on a made-up leak: a name, a construction word, a clip picture,
    // servings of two formats and two identical twins.
    const secrets = await secretsOf(t.knex)
    expect(secrets.words).toEqual(expect.arrayContaining(['gut', 'compound', 'solid steel']))
    const leak: Seen = {
      what: 'made up',
      status: 200,
      headers: {},
      text: 'Now playing the gut string (quorvane silkcore alpha), 1px solid border',
      json: { trials: [{ clips: [{ code: 101, audioUrl: '/a', peaks: [1, 2] }] }] },
    }
    const found = textProblems([leak], secrets)
    expect(found.join('\n')).toMatch(/quorvane silkcore alpha/)
    expect(found.join('\n')).toMatch(/says "gut"/)
    expect(found.join('\n')).toMatch(/carries peaks/)
    const wav = (rate: number) =>
      Buffer.from(
        encodeWav(
          [
            synth.bowedTone({
              f0: 440,
              seconds: 0.5,
              attackSeconds: 0.02,
              peakDbfs: -9,
              sampleRate: rate,
            }),
          ],
          rate,
          { bitDepth: 16 },
        ),
      )
    expect(
      formatProblems([
        { trial: 0, screen: 0, code: 1, bytes: wav(48_000) },
        { trial: 0, screen: 0, code: 2, bytes: wav(44_100) },
      ]),
    ).toHaveLength(2)
    const same = wav(48_000)
    const twins = twinProblems(
      [
        { trial: 0, screen: 0, code: 1, bytes: same },
        { trial: 0, screen: 0, code: 2, bytes: same },
      ],
      [
        {
          repeatOf: null,
          servings: [
            { code: 1, recipeId: 7 },
            { code: 2, recipeId: 7 },
          ],
        },
      ],
      false,
    )
    expect(twins.problems).toHaveLength(1)
  })
})
