import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { parse as parseCsv } from 'csv-parse/sync'
import { fixedClock } from '../../server/clock'
import type { SessionFindings } from '../../shared/schemas/findings'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addClip, addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'
import { seedDemoSessions } from '../../seeds/demo/sessions'
import { headphonePicks, invitedOf, takeHeadphoneCheck, type Invited } from './playerFixtures'

// The headphone check as the server deals, scores and counts it; the pause and the one retry;
// the flag a second failure leaves; and the findings that leave failed checks out by default.
// The pass mark, 5 of 6 right, is the one the check was published with (Woods et al. 2017,
// "Headphone screening to facilitate web-based auditory experiments").

const clock = fixedClock(new Date('2026-12-03T09:00:00Z'))
const KEYS = ['brightness', 'bow_response', 'warmth']
let t: TestApp
let developer: Agent
let analyst: Agent

beforeAll(async () => {
  t = await buildApp({ clock })
  developer = await signInAs(t.app, 'developer')
  analyst = await signInAs(t.app, 'analyst')
})
afterAll(() => t.close())

const api = () => request(t.app)
const start = (token: string) => api().post('/api/player/headphone/start').send({ token })
const state = (token: string) => api().get('/api/player/state').set('X-Invitation-Token', token)

/** An open session of two recipes, one matched set and no repeats: two trials per player. */
async function study(format: 'rating' | 'playtest', players: number) {
  const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1, 'Headphone')
  const { id } = await openStudy(developer, {
    name: `Headphone check ${format}`,
    format,
    recipeIds,
    clipSets: format === 'playtest' ? [] : clipSets,
    duplicates: 0,
    deadline: isoDay(clock.now(), 7),
  })
  const playerIds = await addPlayers(t.knex, players)
  await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds })
  await t.settle()
  const invited = await invitedOf(t, id)
  for (const p of invited) await api().post('/api/player/consent').send({ token: p.token })
  return { id, invited }
}

const tracking = async (sessionId: number) =>
  (await developer.get(`/api/sessions/${sessionId}/invitations`)).body.invitations as {
    id: number
    playerCode: string
    headphoneCheck: string | null
  }[]

describe('the headphone check, dealt and scored by the server', () => {
  let invited: Invited[]
  let sessionId: number
  beforeAll(async () => {
    ;({ id: sessionId, invited } = await study('rating', 5))
  })

  it('deals six sets of the three tones, the quiet one twice in each place, and nothing else', async () => {
    const res = await start(invited[0].token)
    const again = await start(invited[0].token)

    expect(res.status).toBe(200)
    expect(Object.keys(res.body).sort()).toEqual(['attempt', 'trials'])
    expect(res.body.attempt).toBe(1)
    expect(res.body.trials).toHaveLength(6)
    const places = [0, 0, 0]
    for (const trial of res.body.trials) {
      expect(Object.keys(trial)).toEqual(['tones'])
      expect([...trial.tones].sort()).toEqual(['antiphase', 'quiet', 'reference'])
      places[trial.tones.indexOf('quiet')]++
    }
    expect(places).toEqual([2, 2, 2])
    // A reload gets the same unanswered attempt back, not a fresh one.
    expect(again.body).toEqual(res.body)
    expect(await t.knex('headphone_checks').where({ invitation_id: invited[0].id })).toHaveLength(1)
  })

  it('passes with 5 of 6 right at the first attempt, and then deals no more', async () => {
    const p = invited[0]
    const deal = (await start(p.token)).body
    const passed = await api()
      .post('/api/player/headphone')
      .send({ token: p.token, attempt: 1, responses: headphonePicks(deal, 1) })
    const more = await start(p.token)
    const row = await t.knex('headphone_checks').where({ invitation_id: p.id }).first()

    expect(passed.status).toBe(200)
    expect(passed.body.headphone).toEqual({
      status: 'passed',
      correct: 5,
      trials: 6,
      passed: true,
      attempts: 1,
      retryInSeconds: null,
    })
    expect(more.status).toBe(409)
    expect(more.body.error.message).toBe('The headphone check is already passed')
    expect(row).toMatchObject({ attempt: 1, correct: 5, trials: 6, at: clock.now().toISOString() })
    expect(JSON.parse(row.responses)).toEqual(headphonePicks(deal, 1))
  })

  it('fails with 4 of 6 right; a retry before the pause is refused, one after it is dealt', async () => {
    const p = invited[1]
    const failed = await takeHeadphoneCheck(t, p.token, 2)
    clock.advance(10_000)
    const early = await start(p.token)
    const waiting = await state(p.token)
    clock.advance(19_999)
    const stillEarly = await start(p.token)
    clock.advance(1)
    const retry = await start(p.token)
    const passed = await api()
      .post('/api/player/headphone')
      .send({ token: p.token, attempt: 2, responses: headphonePicks(retry.body) })

    expect(failed.status).toBe(200)
    expect(failed.body.headphone).toEqual({
      status: 'retry',
      correct: 4,
      trials: 6,
      passed: false,
      attempts: 1,
      retryInSeconds: 30,
    })
    expect(early.status).toBe(409)
    expect(early.body.error).toMatchObject({
      code: 'conflict',
      message: 'Please wait 20 more seconds before trying the headphone check again.',
    })
    expect(waiting.body.headphone.retryInSeconds).toBe(20)
    expect(stillEarly.status).toBe(409)
    expect(stillEarly.body.error.message).toBe(
      'Please wait 1 more second before trying the headphone check again.',
    )
    expect(retry.status).toBe(200)
    expect(retry.body.attempt).toBe(2)
    expect(passed.body.headphone).toMatchObject({ status: 'passed', correct: 6, attempts: 2 })
  })

  it('lets the player go on after a second failure, flagged, and refuses a third attempt', async () => {
    const p = invited[2]
    await takeHeadphoneCheck(t, p.token, 6)
    clock.advance(30_000)
    const second = await takeHeadphoneCheck(t, p.token, 3)
    clock.advance(60_000)
    const third = await start(p.token)
    const thirdSent = await api()
      .post('/api/player/headphone')
      .send({ token: p.token, attempt: 3, responses: [0, 0, 0, 0, 0, 0] })
    const level = await api().post('/api/player/level').send({ token: p.token })
    const plan = (await api().get('/api/player/plan').set('X-Invitation-Token', p.token)).body.plan
    const answer = await api()
      .put(`/api/player/answers/${plan.trials[0].index}`)
      .send({ token: p.token, answer: { kind: 'rating', values: { brightness: 50 } } })

    expect(second.body.headphone).toEqual({
      status: 'failed',
      correct: 3,
      trials: 6,
      passed: false,
      attempts: 2,
      retryInSeconds: null,
    })
    for (const res of [third, thirdSent]) {
      expect(res.status).toBe(409)
      expect(res.body.error.message).toBe(
        'The headphone check can be taken twice at most. You can go on to the trials.',
      )
    }
    expect(level.status).toBe(200)
    expect(answer.status).toBe(200)
    const rows = await t.knex('headphone_checks').where({ invitation_id: p.id }).orderBy('attempt')
    expect(rows.map((r) => [r.attempt, r.correct, Boolean(r.passed)])).toEqual([
      [1, 0, false],
      [2, 3, false],
    ])
  })

  it('counts a resent answer once and refuses other picks for a scored attempt', async () => {
    const p = invited[3]
    const deal = (await start(p.token)).body
    const send = (responses: number[]) =>
      api().post('/api/player/headphone').send({ token: p.token, attempt: 1, responses })
    const first = await send(headphonePicks(deal, 2))
    const resent = await send(headphonePicks(deal, 2))
    const changed = await send(headphonePicks(deal))
    const unstarted = await send(headphonePicks(deal))

    expect(first.body.headphone).toMatchObject({ status: 'retry', attempts: 1, correct: 4 })
    expect(resent.status).toBe(200)
    expect(resent.body.headphone).toEqual(first.body.headphone)
    expect(changed.status).toBe(409)
    expect(changed.body.error.message).toBe(
      'That attempt at the headphone check has already been scored',
    )
    expect(unstarted.status).toBe(409)
    const second = await api()
      .post('/api/player/headphone')
      .send({ token: p.token, attempt: 2, responses: headphonePicks(deal) })
    expect(second.status).toBe(409)
    expect(second.body.error.message).toBe(
      'That attempt at the headphone check was not started: start the check first',
    )
    expect(await t.knex('headphone_checks').where({ invitation_id: p.id })).toHaveLength(1)
  })

  it('asks for consent first', async () => {
    const [other] = await addPlayers(t.knex, 1)
    await developer.post(`/api/sessions/${sessionId}/invitations`).send({ playerIds: [other] })
    const fresh = (await invitedOf(t, sessionId)).at(-1)!
    const res = await start(fresh.token)

    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe('Please give your consent first')
  })

  it('shows staff each outcome, never the tones or the picks', async () => {
    const rows = await tracking(sessionId)
    const byId = new Map(rows.map((r) => [r.id, r]))

    expect(invited.map((p) => byId.get(p.id)!.headphoneCheck)).toEqual([
      'passed',
      'passed',
      'failed',
      'retry',
      'not_done',
    ])
    const text = JSON.stringify(rows)
    expect(text).not.toMatch(/tones|responses|quiet|antiphase|dealt/)
  })
})

describe('the trials wait for the headphone check', () => {
  // The player is told what to do and nothing else: not their score, not the trials.
  const REFUSAL = {
    error: {
      code: 'conflict',
      message: 'Finish the headphone check first: it takes about two minutes.',
    },
  }
  const level = (token: string) => api().post('/api/player/level').send({ token })
  const answer = (token: string, index: number) =>
    api()
      .put(`/api/player/answers/${index}`)
      .send({ token, answer: { kind: 'rating', values: { brightness: 50 } } })
  const stored = (invitationId: number) => t.knex('answers').where({ invitation_id: invitationId })
  let invited: Invited[]
  let sessionId: number
  beforeAll(async () => {
    ;({ id: sessionId, invited } = await study('rating', 3))
  })

  it('refuses the level and every answer before the check, yet serves the plan', async () => {
    const p = invited[0]
    const plan = await api().get('/api/player/plan').set('X-Invitation-Token', p.token)
    const early = [await level(p.token), await answer(p.token, 0), await answer(p.token, 99)]
    // A dealt attempt not yet answered is not a finished check either.
    await start(p.token)
    const dealt = [await level(p.token), await answer(p.token, 1)]

    // The player's page needs the plan before the check: its format decides whether there is
    // a check at all, and the level step plays the first clip.
    expect(plan.status).toBe(200)
    for (const res of [...early, ...dealt]) {
      expect(res.status).toBe(409)
      expect(res.body).toEqual(REFUSAL)
    }
    expect(await stored(p.id)).toHaveLength(0)
    expect((await state(p.token)).body).toMatchObject({ levelSetAt: null, answers: [] })
  })

  it('lets the player on once the check is passed', async () => {
    const p = invited[0]
    await takeHeadphoneCheck(t, p.token)
    const set = await level(p.token)
    const saved = await answer(p.token, 0)

    expect(set.status).toBe(200)
    expect(set.body.levelSetAt).toBe(clock.now().toISOString())
    expect(saved.status).toBe(200)
    expect(saved.body).toMatchObject({ saved: true, answered: 1 })
  })

  it('still refuses after one failure, while the retry is open, and lets on after the second', async () => {
    const p = invited[1]
    await takeHeadphoneCheck(t, p.token, 2)
    const afterOne = [await level(p.token), await answer(p.token, 0)]
    clock.advance(30_000)
    const pauseOver = [await level(p.token), await answer(p.token, 0)]
    await takeHeadphoneCheck(t, p.token, 2)
    const set = await level(p.token)
    const saved = await answer(p.token, 0)

    for (const res of [...afterOne, ...pauseOver]) {
      expect(res.status).toBe(409)
      expect(res.body).toEqual(REFUSAL)
    }
    expect(set.status).toBe(200)
    expect(saved.status).toBe(200)
    expect(await stored(p.id)).toHaveLength(1)
    // Let on, but left out of the findings by default.
    const code = (await tracking(sessionId)).find((r) => r.id === p.id)!.playerCode
    const f = (await analyst.get(`/api/findings/${sessionId}`)).body as SessionFindings
    expect(f.reliability.players.find((r) => r.playerCode === code)).toMatchObject({
      excluded: true,
      exclusionReason: 'headphone check failed',
      headphoneFailed: true,
    })
    expect(f.provenance).toMatchObject({ headphoneExcluded: 1 })
  })

  it('asks a play-test for no check before the level or the answers', async () => {
    const {
      invited: [p],
    } = await study('playtest', 1)
    const plan = (await api().get('/api/player/plan').set('X-Invitation-Token', p.token)).body.plan
    const set = await level(p.token)
    const saved = await api()
      .put(`/api/player/answers/${plan.trials[0].index}`)
      .send({ token: p.token, answer: { kind: 'playtest', values: { brightness: 50 } } })

    expect(set.status).toBe(200)
    expect(saved.status).toBe(200)
    expect(await stored(p.id)).toHaveLength(1)
  })
})

describe('answers stored before the check was required', () => {
  let sessionId: number
  let older: Invited
  let olderCode: string
  // Each player rates every clip alike, so a recipe's mean is worked out by hand.
  const VALUES = [20, 40]

  beforeAll(async () => {
    const s = await study('rating', 2)
    sessionId = s.id
    older = s.invited[1]
    for (const [i, p] of s.invited.entries()) {
      await takeHeadphoneCheck(t, p.token)
      const plan = (await api().get('/api/player/plan').set('X-Invitation-Token', p.token)).body
        .plan
      const values = Object.fromEntries(KEYS.map((k) => [k, VALUES[i]]))
      for (const trial of plan.trials)
        await api()
          .put(`/api/player/answers/${trial.index}`)
          .send({ token: p.token, answer: { kind: 'rating', values } })
          .expect(200)
    }
    // An older database: the answers are there, and no check was ever recorded for them.
    await t.knex('headphone_checks').where({ invitation_id: older.id }).delete()
    olderCode = (await tracking(sessionId)).find((r) => r.id === older.id)!.playerCode
  })

  it('still reads them, for the player and in the findings, counted as not done', async () => {
    const mine = await state(older.token)
    const f = (await analyst.get(`/api/findings/${sessionId}`)).body as SessionFindings
    const row = (await tracking(sessionId)).find((r) => r.id === older.id)!

    expect(mine.status).toBe(200)
    expect(mine.body.answers).toHaveLength(2)
    expect(mine.body.answers[0].answer).toEqual({
      kind: 'rating',
      values: { brightness: 40, bow_response: 40, warmth: 40 },
    })
    expect(mine.body.headphone).toBeNull()
    expect(row.headphoneCheck).toBe('not_done')
    expect(f.reliability.players.find((p) => p.playerCode === olderCode)).toMatchObject({
      excluded: false,
      exclusionReason: null,
      headphoneFailed: false,
    })
    expect(f.provenance).toMatchObject({ excluded: 0, headphoneExcluded: 0, players: 2 })
    // (20 + 40) / 2 = 30 on every attribute, both players counted; sd = √((10² + 10²) / 1).
    for (const a of f.attributes)
      for (const m of a.recipes) {
        expect(m.n).toBe(2)
        expect(m.mean).toBeCloseTo(30, 10)
        expect(m.sd).toBeCloseTo(Math.sqrt(200), 10)
      }
  })

  it('refuses a new save from that player until the check is finished', async () => {
    const before = await t.knex('answers').where({ invitation_id: older.id }).orderBy('id')
    const res = await api()
      .put(`/api/player/answers/${before[0].trial_index}`)
      .send({ token: older.token, answer: { kind: 'rating', values: { brightness: 99 } } })

    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe(
      'Finish the headphone check first: it takes about two minutes.',
    )
    expect(await t.knex('answers').where({ invitation_id: older.id }).orderBy('id')).toEqual(before)
  })
})

describe('a play-test', () => {
  it('has no headphone check, and its tracking shows none', async () => {
    const { id, invited } = await study('playtest', 1)
    const res = await start(invited[0].token)
    const rows = await tracking(id)

    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe(
      'This session has no headphone check: its strings are played, not listened to',
    )
    expect(rows[0].headphoneCheck).toBeNull()
  })
})

describe('findings and a failed headphone check', () => {
  let sessionId: number
  let flaggedCode: string
  // Every player rates every clip the same on every attribute: a recipe's mean is then the mean
  // of the players' values, worked out here by hand.
  const VALUES = [20, 40, 90]

  beforeAll(async () => {
    const s = await study('rating', 3)
    sessionId = s.id
    for (const [i, p] of s.invited.entries()) {
      if (i < 2) await takeHeadphoneCheck(t, p.token)
      else {
        await takeHeadphoneCheck(t, p.token, 4)
        clock.advance(30_000)
        await takeHeadphoneCheck(t, p.token, 4)
      }
      const plan = (await api().get('/api/player/plan').set('X-Invitation-Token', p.token)).body
        .plan
      const values = Object.fromEntries(KEYS.map((k) => [k, VALUES[i]]))
      for (const trial of plan.trials)
        await api()
          .put(`/api/player/answers/${trial.index}`)
          .send({ token: p.token, answer: { kind: 'rating', values } })
    }
    flaggedCode = (await tracking(sessionId)).find((r) => r.headphoneCheck === 'failed')!.playerCode
  })

  const findings = async () =>
    (await analyst.get(`/api/findings/${sessionId}`)).body as SessionFindings
  const means = async () =>
    parseCsv((await analyst.get(`/api/findings/${sessionId}/export/means.csv`)).text, {
      columns: true,
    }) as Record<string, string>[]
  const answersCsv = async () =>
    parseCsv((await analyst.get(`/api/findings/${sessionId}/export/answers.csv`)).text, {
      columns: true,
    }) as Record<string, string>[]

  it('leaves the player out by default, with the reason, in the page and the exports', async () => {
    const f = await findings()
    const row = f.reliability.players.find((p) => p.playerCode === flaggedCode)!
    const brightness = f.attributes.find((a) => a.attribute === 'brightness')!

    expect(row).toMatchObject({
      excluded: true,
      exclusionReason: 'headphone check failed',
      headphoneFailed: true,
    })
    expect(f.summary.excluded).toBe(1)
    expect(f.provenance).toMatchObject({ excluded: 1, headphoneExcluded: 1, players: 3 })
    // (20 + 40) / 2 = 30 from the two players who passed; sd = √((10² + 10²) / 1) = √200.
    for (const m of brightness.recipes) {
      expect(m.n).toBe(2)
      expect(m.mean).toBeCloseTo(30, 10)
      expect(m.sd).toBeCloseTo(Math.sqrt(200), 10)
    }
    // Every attribute was rated alike, so every row of the export reads the same.
    const csv = await means()
    expect(csv).toHaveLength(KEYS.length * 2)
    expect(new Set(csv.map((r) => `${r.n}:${r.mean}`))).toEqual(new Set(['2:30']))
    const answers = await answersCsv()
    expect(new Set(answers.filter((r) => r.player === flaggedCode).map((r) => r.excluded))).toEqual(
      new Set(['true']),
    )
    expect(new Set(answers.filter((r) => r.player !== flaggedCode).map((r) => r.excluded))).toEqual(
      new Set(['false']),
    )
    // Nothing was stored as a manual exclusion: the rule follows from the checks.
    expect(await t.knex('exclusions').where({ session_id: sessionId })).toHaveLength(0)
  })

  it('does not let a developer take the player back in', async () => {
    const res = await developer
      .delete(`/api/findings/${sessionId}/exclusions/${flaggedCode}`)
      .send({ reason: 'Sounded fine to me' })
    expect(res.status).toBe(403)
    expect(await t.knex('headphone_inclusions').where({ session_id: sessionId })).toHaveLength(0)
  })

  it('lets an analyst take the player back in, audited, and the figures change', async () => {
    const noReason = await analyst.delete(`/api/findings/${sessionId}/exclusions/${flaggedCode}`)
    const res = await analyst
      .delete(`/api/findings/${sessionId}/exclusions/${flaggedCode}`)
      .send({ reason: 'Wired headphones confirmed by phone' })
    const twice = await analyst
      .delete(`/api/findings/${sessionId}/exclusions/${flaggedCode}`)
      .send({ reason: 'Wired headphones confirmed by phone' })
    const audit = await t
      .knex('audit_log')
      .where({ action: 'findings.player_included', target_id: String(sessionId) })
      .first()

    expect(noReason.status).toBe(422)
    expect(res.status).toBe(200)
    const f = res.body as SessionFindings
    const row = f.reliability.players.find((p) => p.playerCode === flaggedCode)!
    expect(row).toMatchObject({ excluded: false, exclusionReason: null, headphoneFailed: true })
    expect(f.summary.excluded).toBe(0)
    expect(f.provenance).toMatchObject({
      excluded: 0,
      headphoneExcluded: 0,
      lastChange: { action: 'findings.player_included' },
    })
    // (20 + 40 + 90) / 3 = 50; sd = √((30² + 10² + 40²) / 2) = √1300.
    for (const m of f.attributes.find((a) => a.attribute === 'brightness')!.recipes) {
      expect(m.n).toBe(3)
      expect(m.mean).toBeCloseTo(50, 10)
      expect(m.sd).toBeCloseTo(Math.sqrt(1300), 10)
    }
    expect(new Set((await means()).map((r) => `${r.n}:${r.mean}`))).toEqual(new Set(['3:50']))
    expect(new Set((await answersCsv()).map((r) => r.excluded))).toEqual(new Set(['false']))
    expect(twice.status).toBe(409)
    expect(JSON.parse(audit.details)).toEqual({
      playerCode: flaggedCode,
      reason: 'Wired headphones confirmed by phone',
      rule: 'headphone check failed',
    })
    expect(audit.actor_email).toBe('analyst@ringdown.test')
  })

  it('lets the analyst undo that, so the rule leaves the player out again', async () => {
    const res = await analyst
      .post(`/api/findings/${sessionId}/exclusions`)
      .send({ playerCode: flaggedCode, reason: 'Taken back by mistake' })
    const twice = await analyst
      .post(`/api/findings/${sessionId}/exclusions`)
      .send({ playerCode: flaggedCode, reason: 'Taken back by mistake' })
    const audit = await t
      .knex('audit_log')
      .where({ action: 'findings.player_excluded', target_id: String(sessionId) })
      .first()

    expect(res.status).toBe(200)
    const row = res.body.reliability.players.find(
      (p: { playerCode: string }) => p.playerCode === flaggedCode,
    )
    expect(row).toMatchObject({ excluded: true, exclusionReason: 'headphone check failed' })
    expect(res.body.attributes[0].recipes[0]).toMatchObject({ n: 2, mean: 30 })
    expect(twice.status).toBe(409)
    expect(twice.body.error.message).toBe(
      `${flaggedCode} is already excluded from these findings (headphone check failed)`,
    )
    expect(JSON.parse(audit.details)).toMatchObject({ rule: 'headphone check failed' })
    expect(await t.knex('headphone_inclusions').where({ session_id: sessionId })).toHaveLength(0)
    expect(await t.knex('exclusions').where({ session_id: sessionId })).toHaveLength(0)
  })
})

describe('the demo', () => {
  let d: TestApp
  let reader: Agent
  beforeAll(async () => {
    d = await buildApp()
    // The demo's recordings as rows: two takes of each matched set the story uses.
    const recipes: { id: number; instrument: string }[] = await d
      .knex('recipes')
      .whereLike('name', 'Aurel A %')
      .orWhereLike('name', 'Tessel D %')
      .select('id', 'instrument')
    for (const r of recipes)
      for (const [excerpt, performer] of [
        ['scale', 'PF-01'],
        ['phrase', 'PF-02'],
      ])
        for (let take = 0; take < 2; take++)
          await addClip(d.knex, r.id, {
            excerpt,
            performer,
            instrument: r.instrument === 'cello' ? 'VC-1' : 'VN-3',
          })
    await seedDemoSessions(d.app.locals.ctx)
    reader = await signInAs(d.app, 'analyst')
  })
  afterAll(() => d.close())

  const sessionsOf = (where: Record<string, string>) =>
    d.knex('sessions').where(where).select('id', 'format', 'status') as Promise<
      { id: number; format: string; status: string }[]
    >
  const checksOf = (sessionId: number) =>
    d
      .knex('headphone_checks as h')
      .join('invitations as i', 'i.id', 'h.invitation_id')
      .where('i.session_id', sessionId)
      .orderBy(['i.player_index', 'h.attempt'])
      .select('i.player_index', 'h.attempt', 'h.passed', 'h.dealt_at', 'h.at')

  it('shows the open round with a retry passed and a player left out after two failures', async () => {
    const [open] = await sessionsOf({ player_title: 'Winter listening round' })
    const f = (await reader.get(`/api/findings/${open.id}`)).body as SessionFindings
    const rows = (await reader.get(`/api/sessions/${open.id}/invitations`)).body.invitations as {
      playerCode: string
      headphoneCheck: string
    }[]
    const checks = await checksOf(open.id)

    expect(open.status).toBe('open')
    expect(rows.slice(0, 4).map((r) => r.headphoneCheck)).toEqual([
      'passed',
      'passed',
      'failed',
      'not_done',
    ])
    expect(checks.map((c) => [c.player_index, c.attempt, Boolean(c.passed)])).toEqual([
      [0, 1, true],
      [1, 1, false],
      [1, 2, true],
      [2, 1, false],
      [2, 2, false],
    ])
    // Each retry waited out the pause after the failure before it.
    for (const [a, b] of [
      [checks[1], checks[2]],
      [checks[3], checks[4]],
    ])
      expect(Date.parse(b.dealt_at) - Date.parse(a.at)).toBeGreaterThanOrEqual(30_000)
    const left = f.reliability.players.filter((p) => p.excluded)
    expect(left).toEqual([
      expect.objectContaining({
        playerCode: rows[2].playerCode,
        exclusionReason: 'headphone check failed',
        headphoneFailed: true,
      }),
    ])
    expect(f.provenance).toMatchObject({ excluded: 1, headphoneExcluded: 1 })
  })

  it('has every player of a closed listening session pass at the first attempt, none left out', async () => {
    const closed = (await sessionsOf({ status: 'closed' })).filter((x) => x.format !== 'playtest')
    expect(closed.map((x) => x.format).sort()).toEqual(['pair', 'rating', 'triangle'])
    for (const x of closed) {
      const f = (await reader.get(`/api/findings/${x.id}`)).body as SessionFindings
      const checks = await checksOf(x.id)
      expect(checks.length).toBe(f.provenance.players)
      expect(checks.every((c) => c.attempt === 1 && Boolean(c.passed))).toBe(true)
      expect(f.provenance.headphoneExcluded).toBe(0)
    }
  })
})
