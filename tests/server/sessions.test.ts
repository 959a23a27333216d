import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fixedClock } from '../../server/clock'
import { buildPlayerPlan, sessionCodes } from '../../server/formats/index.ts'
import {
  pairedTSampleSize,
  signTestSampleSize,
  triangleSampleSize,
} from '../../server/analysis/index.ts'
import { seedDemoSessions } from '../../seeds/demo/sessions'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'
import {
  addAnswers,
  addClip,
  addPlayers,
  addRecipe,
  isoDay,
  openStudy,
  studyFixture,
} from './sessionFixtures'

const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
let t: TestApp
let developer: Agent
let analyst: Agent

beforeAll(async () => {
  t = await buildApp({ clock })
  developer = await signInAs(t.app, 'developer')
  analyst = await signInAs(t.app, 'analyst')
})
afterAll(() => t.close())

async function ratingBody(over: Record<string, unknown> = {}) {
  const { recipeIds, clipSets } = await studyFixture(t.knex)
  return {
    name: 'Damping study',
    purpose: 'Which treatment sounds darkest',
    playerTitle: 'Evening listening',
    format: 'rating',
    recipeIds,
    clipSets,
    deadline: isoDay(clock.now(), 14),
    ...over,
  }
}

describe('the session designer', () => {
  it('creates a draft with the default attributes, a seed and the trials each player gets', async () => {
    const body = await ratingBody()

    const res = await developer.post('/api/sessions').send(body)

    expect(res.status).toBe(201)
    const s = res.body.session
    expect(s).toMatchObject({
      status: 'draft',
      format: 'rating',
      recipeCount: 3,
      locked: false,
      answersCount: 0,
      // Three recipes in two matched sets, rated one clip per trial.
      trialCount: 6,
      warnings: [],
      createdBy: 'Tomas Verhallen',
    })
    expect(s.seed).toMatch(/^[0-9a-f]{16}$/)
    expect(s.attributes.map((a: { key: string }) => a.key)).toEqual([
      'brightness',
      'bow_response',
      'warmth',
    ])
    expect(s.attributes[0]).toMatchObject({ low: 'dark', high: 'bright' })
    expect(s.clipSets[0]).toMatchObject({ excerptName: 'scale', instrumentCode: 'VN-T1' })
    expect(s.clipSets[0].clips).toHaveLength(3)
    expect(s.timePoints).toEqual([{ id: s.id, label: null, status: 'draft' }])
  })

  it('keeps custom attributes with their end labels as they were given', async () => {
    const attributes = [{ key: 'focus', name: 'Focus', low: 'diffuse', high: 'focused' }]

    const res = await developer.post('/api/sessions').send(await ratingBody({ attributes }))

    expect(res.status).toBe(201)
    expect(res.body.session.attributes).toEqual(attributes)
  })

  it('refuses a single recipe at the recipe field', async () => {
    const body = await ratingBody()
    const res = await developer
      .post('/api/sessions')
      .send({ ...body, recipeIds: body.recipeIds.slice(0, 1) })

    expect(res.status).toBe(422)
    expect(res.body.error.fields.recipeIds[0]).toMatch(/at least two recipes/)
  })

  it('refuses a listening session without clips at the clip-set field', async () => {
    const res = await developer.post('/api/sessions').send(await ratingBody({ clipSets: [] }))

    expect(res.status).toBe(422)
    expect(res.body.error.fields.clipSets[0]).toMatch(/at least one matched clip set/)
  })

  it('refuses more hidden duplicates than a player has trials', async () => {
    const res = await developer.post('/api/sessions').send(await ratingBody({ duplicates: 7 }))

    expect(res.status).toBe(422)
    expect(res.body.error.fields.duplicates[0]).toMatch(/At most 6/)
  })

  it('refuses a deadline in the past', async () => {
    const res = await developer
      .post('/api/sessions')
      .send(await ratingBody({ deadline: isoDay(clock.now(), -1) }))

    expect(res.status).toBe(422)
    expect(res.body.error.fields.deadline[0]).toMatch(/passed/)
  })

  it('refuses unknown recipes and clips, and sets that mix recordings', async () => {
    const body = await ratingBody()
    const stranger = await addClip(t.knex, body.recipeIds[0], { performer: 'PF-OTHER' })
    const mixed = [{ key: 'mixed', clipIds: [...body.clipSets[0].clipIds.slice(1), stranger] }]

    const unknown = await developer
      .post('/api/sessions')
      .send({ ...body, recipeIds: [...body.recipeIds, 999_999] })
    const missingClip = await developer
      .post('/api/sessions')
      .send({ ...body, clipSets: [{ key: 'x', clipIds: [999_998] }] })
    const mixedRes = await developer.post('/api/sessions').send({ ...body, clipSets: mixed })

    expect(unknown.status).toBe(422)
    expect(unknown.body.error.fields.recipeIds).toContain('Recipe 999999 does not exist')
    expect(missingClip.body.error.fields.clipSets).toContain('Clip 999998 does not exist')
    expect(mixedRes.body.error.fields.clipSets[0]).toMatch(/mixes recordings/)
  })

  it('warns when a rating set lacks a recipe, and refuses the same gap for pairs', async () => {
    const body = await ratingBody()
    const gappy = [
      body.clipSets[0],
      { ...body.clipSets[1], clipIds: body.clipSets[1].clipIds.slice(0, 2) },
    ]
    const missing = (await t.knex('recipes').where({ id: body.recipeIds[2] }).first('name')).name

    const rating = await developer.post('/api/sessions').send({ ...body, clipSets: gappy })
    const pair = await developer
      .post('/api/sessions')
      .send({ ...body, format: 'pair', clipSets: gappy })

    expect(rating.status).toBe(201)
    expect(rating.body.session.warnings).toEqual([
      `Set 'scale · ${body.clipSets[1].key.split(' · ')[1]} · VN-T1' has no clip of ${missing}`,
    ])
    expect(pair.status).toBe(422)
    expect(pair.body.error.fields.clipSets[0]).toMatch(/has no clip of .*every recipe needs one/)
  })

  it('refuses unknown fields and a rating session without attributes', async () => {
    const extra = await developer
      .post('/api/sessions')
      .send({ ...(await ratingBody()), colour: 'red' })
    const bare = await developer.post('/api/sessions').send(await ratingBody({ attributes: [] }))

    expect(extra.status).toBe(422)
    expect(extra.body.error.fields.colour).toEqual(['Unknown field'])
    expect(bare.body.error.fields.attributes[0]).toMatch(/at least one attribute/)
  })

  it('refuses a play-test of a single recipe: there is nothing to compare', async () => {
    const solo = await addRecipe(t.knex, 'Lonely')
    const res = await developer.post('/api/sessions').send({
      name: 'Play alone',
      playerTitle: 'Strings to try at home',
      format: 'playtest',
      recipeIds: [solo],
      deadline: isoDay(clock.now(), 3),
    })

    expect(res.status).toBe(422)
    expect(res.body.error.fields.recipeIds).toBeDefined()
  })

  it('lists sessions for every staff role', async () => {
    const res = await analyst.get('/api/sessions')

    expect(res.status).toBe(200)
    expect(res.body.sessions.length).toBeGreaterThan(0)
    expect(res.body.sessions[0]).toHaveProperty('invitedCount')
  })
})

describe('a session from draft to closed', () => {
  it('opens, locks the design once someone answered, keeps the player words and deadline editable, then closes', async () => {
    const { id } = await openStudy(developer, await ratingBody())
    const [playerId] = await addPlayers(t.knex, 1)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: [playerId] })

    const again = await developer.post(`/api/sessions/${id}/open`)
    const beforeAnswers = await saveEdit(developer, `/api/sessions/${id}`, { duplicates: 1 })
    const inv = await t.knex('invitations').where({ session_id: id }).first('id')
    await addAnswers(t.knex, inv.id, [0], clock.now().toISOString())
    const locked = await saveEdit(developer, `/api/sessions/${id}`, { duplicates: 2 })
    const editable = await saveEdit(developer, `/api/sessions/${id}`, {
      playerTitle: 'Evening listening, second week',
      playerMessage: 'Take a break halfway.',
      deadline: isoDay(clock.now(), 20),
    })
    const closed = await developer.post(`/api/sessions/${id}/close`)
    const afterClose = await saveEdit(developer, `/api/sessions/${id}`, { playerMessage: 'x' })

    expect(again.status).toBe(409)
    expect(beforeAnswers.status).toBe(200)
    expect(beforeAnswers.body.session.trialCount).toBe(7)
    expect(locked.status).toBe(409)
    expect(locked.body.error.fields).toEqual({
      duplicates: ['Locked: players have already answered'],
    })
    expect(editable.status).toBe(200)
    expect(editable.body.session).toMatchObject({
      locked: true,
      answersCount: 1,
      playerTitle: 'Evening listening, second week',
      playerMessage: 'Take a break halfway.',
      deadline: isoDay(clock.now(), 20),
      duplicates: 1,
    })
    expect(closed.body.session.status).toBe('closed')
    expect(afterClose.status).toBe(409)
  })

  it('refuses to open a draft whose deadline has passed', async () => {
    const created = await developer
      .post('/api/sessions')
      .send(await ratingBody({ deadline: isoDay(clock.now(), 1) }))
    const id = created.body.session.id
    clock.advance(3 * 86_400_000)
    // Three days on the sign-in cookies have expired, so sign in again on both sides of the jump.
    const later = await signInAs(t.app, 'developer')

    const res = await later.post(`/api/sessions/${id}/open`)
    const detail = await later.get(`/api/sessions/${id}`)
    clock.advance(-3 * 86_400_000)
    developer = await signInAs(t.app, 'developer')
    analyst = await signInAs(t.app, 'analyst')

    expect(res.status).toBe(422)
    expect(res.body.error.fields.deadline[0]).toMatch(/passed/)
    expect(detail.body.session.warnings).toContain(
      'The deadline has passed: choose a new one before opening',
    )
  })

  it('answers 404 for a session that does not exist', async () => {
    expect((await analyst.get('/api/sessions/987654')).status).toBe(404)
  })
})

describe('the preview', () => {
  it('shows player N exactly their plan, by blind code only, and records nothing', async () => {
    const body = await ratingBody({ duplicates: 2 })
    const created = await developer.post('/api/sessions').send(body)
    const s = created.body.session
    const names: string[] = s.recipes.map((r: { name: string }) => r.name)
    const answersBefore = await t.knex('answers').count({ n: '*' })

    const res = await analyst.get(`/api/sessions/${s.id}/preview`).query({ player: 2 })

    expect(res.status).toBe(200)
    const plan = res.body.plan
    const recipeOf = new Map<number, number>()
    for (const set of s.clipSets)
      for (const c of set.clips) recipeOf.set(c.id as number, c.recipeId as number)
    const input = {
      format: 'rating' as const,
      recipes: body.recipeIds,
      clipSets: body.clipSets.map((c: { key: string; clipIds: number[] }) => ({
        excerptKey: c.key,
        clips: c.clipIds.map((clipId) => ({ clipId, recipeId: recipeOf.get(clipId)! })),
      })),
      duplicates: 2,
      seed: s.seed,
    }
    const expected = buildPlayerPlan(input, 1, sessionCodes(input))
    expect(plan.trials.map((tr: { clips: { code: number }[] }) => tr.clips[0].code)).toEqual(
      expected.trials.map((tr) => (tr.kind === 'rating' ? tr.clip.code : null)),
    )
    expect(plan.trials).toHaveLength(8)
    expect(plan.cautions[0]).toMatch(/hearing/)
    expect(plan.trials[0].clips[0].audioUrl).toMatch(/^\/api\/clips\/\d+\/audio$/)
    const text = JSON.stringify(plan)
    for (const name of names) expect(text).not.toContain(name)
    expect(text).not.toMatch(/recipe|repeatOf|"odd"|excerptKey|seed/i)
    expect(await t.knex('answers').count({ n: '*' })).toEqual(answersBefore)
  })

  it('serves three coded clips per triangle and hides which is odd', async () => {
    const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1)
    const created = await developer.post('/api/sessions').send({
      name: 'Triangle preview',
      playerTitle: 'Odd one out',
      format: 'triangle',
      recipeIds,
      clipSets,
      deadline: isoDay(clock.now(), 5),
    })

    const res = await developer.get(`/api/sessions/${created.body.session.id}/preview`)

    expect(res.body.plan.attributes).toEqual([])
    expect(res.body.plan.trials).toHaveLength(1)
    const codes = res.body.plan.trials[0].clips.map((c: { code: number }) => c.code)
    expect(new Set(codes).size).toBe(3)
  })
})

describe('a design whose clip has gone', () => {
  it('is shown as a warning and a conflict, not a server fault', async () => {
    const body = await ratingBody()
    const created = await developer.post('/api/sessions').send(body)
    const id = created.body.session.id
    const gone = body.clipSets[0].clipIds[0]
    await t.knex('clips').where({ id: gone }).delete()

    const detail = await developer.get(`/api/sessions/${id}`)
    const preview = await developer.get(`/api/sessions/${id}/preview`)
    const open = await developer.post(`/api/sessions/${id}/open`)

    expect(detail.status).toBe(200)
    expect(detail.body.session.warnings).toContain(`Clip ${gone} does not exist`)
    expect(preview.status).toBe(409)
    expect(open.status).toBe(422)
    expect(open.body.error.fields.clipSets).toContain(`Clip ${gone} does not exist`)
  })
})

describe('the planner', () => {
  it('gives the same numbers as the statistics engine, against the panel size', async () => {
    const q = { difference: 8, sd: 14, alpha: 0.05, power: 0.9, share: 0.72, pd: 0.25, n: 24 }

    const res = await analyst.get('/api/planner').query(q)

    expect(res.status).toBe(200)
    expect(res.body.pairedT.players).toBe(
      pairedTSampleSize({ difference: 8, sd: 14, alpha: 0.05, power: 0.9 }).n,
    )
    expect(res.body.signTest.players).toBe(
      signTestSampleSize({ share: 0.72, alpha: 0.05, power: 0.9 }).n,
    )
    expect(res.body.triangle.players).toBe(
      triangleSampleSize({ pd: 0.25, alpha: 0.05, power: 0.9 }).n,
    )
    // ISO 4120 table: 13 correct of 24 at alpha 0.05.
    expect(res.body.triangle).toMatchObject({ minimumCorrect: 13, answers: 24 })
    const [{ n }] = await t.knex('players').where({ status: 'active' }).count({ n: '*' })
    expect(res.body.panelSize).toBe(Number(n))
  })

  it('uses the panel size when no count is given, and refuses nonsense at the field', async () => {
    const strict = await analyst.get('/api/planner').query({ alpha: 0.01, n: 24 })
    const plain = await analyst.get('/api/planner')
    const bad = await analyst.get('/api/planner').query({ share: 0.4 })

    // ISO 4120 table: 15 correct of 24 at alpha 0.01.
    expect(strict.body.triangle.minimumCorrect).toBe(15)
    expect(plain.body.triangle.answers).toBe(plain.body.panelSize)
    expect(bad.status).toBe(422)
    expect(bad.body.error.fields.share).toBeDefined()
  })
})

describe('time points of an aging study', () => {
  it('repeats the design under its own seed, linked to the first, and invites the same players', async () => {
    const { id: first } = await openStudy(developer, await ratingBody({ timePointLabel: 'day 0' }))
    const players = await addPlayers(t.knex, 3)
    await developer.post(`/api/sessions/${first}/invitations`).send({ playerIds: players })
    const inv = await t.knex('invitations').where({ session_id: first }).first('id')
    await developer.post(`/api/invitations/${inv.id}/revoke`)
    await t.settle()
    const sentBefore = t.mailer.sent.length

    const res = await developer
      .post(`/api/sessions/${first}/time-points`)
      .send({ label: 'week 2', deadline: isoDay(clock.now(), 28), inviteSamePlayers: true })
    const later = res.body.session
    const third = await developer
      .post(`/api/sessions/${later.id}/time-points`)
      .send({ label: 'week 6', deadline: isoDay(clock.now(), 56) })
    const clash = await developer
      .post(`/api/sessions/${first}/time-points`)
      .send({ label: 'Week 2', deadline: isoDay(clock.now(), 28) })
    const root = await developer.get(`/api/sessions/${first}`)
    await t.settle()

    expect(res.status).toBe(201)
    const original = root.body.session
    expect(later).toMatchObject({
      parentSessionId: first,
      timePointLabel: 'week 2',
      status: 'open',
      recipeIds: original.recipeIds,
      attributes: original.attributes,
      // The players not revoked at the first time point.
      invitedCount: 2,
    })
    expect(later.clipSets.map((c: { clipIds: number[] }) => c.clipIds)).toEqual(
      original.clipSets.map((c: { clipIds: number[] }) => c.clipIds),
    )
    expect(later.seed).not.toBe(original.seed)
    expect(third.status).toBe(201)
    expect(third.body.session).toMatchObject({
      parentSessionId: first,
      status: 'draft',
      invitedCount: 0,
    })
    expect(clash.status).toBe(409)
    expect(clash.body.error.fields.label).toBeDefined()
    expect(original.timePoints.map((p: { label: string }) => p.label)).toEqual([
      'day 0',
      'week 2',
      'week 6',
    ])
    expect(t.mailer.sent.length - sentBefore).toBe(2)
  })
})

describe('the demo sessions', () => {
  it('add a session in every state, players part-way and queued invitations, once', async () => {
    const d = await buildApp()
    // The demo clips are audio made at start-up; rows are enough for the sessions.
    const demoRecipes: { id: number; name: string; instrument: string }[] = await d
      .knex('recipes')
      .whereIn('name', [
        'Aurel A bare',
        'Aurel A light compound',
        'Aurel A heavy compound',
        'Aurel A fibre wrap',
        'Tessel D round',
        'Tessel D flat',
      ])
      .select('id', 'name', 'instrument')
    for (const r of demoRecipes)
      for (const [excerpt, performer] of [
        ['scale', 'PF-01'],
        ['phrase', 'PF-02'],
      ])
        // Two takes, as the demo records: the second serves twins and hidden repeats.
        for (let take = 0; take < 2; take++)
          await addClip(d.knex, r.id, {
            excerpt,
            performer,
            instrument: r.instrument === 'cello' ? 'VC-1' : 'VN-3',
          })
    const ctx = d.app.locals.ctx

    const made = await seedDemoSessions(ctx)
    const again = await seedDemoSessions(ctx)
    const admin = await signInAs(d.app, 'admin')
    const list = (await admin.get('/api/sessions')).body.sessions as {
      id: number
      status: string
      format: string
      doneCount: number
      invitedCount: number
      timePointLabel: string | null
    }[]
    const rating = list.find((s) => s.format === 'rating')!
    const invitations = (await admin.get(`/api/sessions/${rating.id}/invitations`)).body.invitations
    const closed = list.find((s) => s.format === 'triangle')!
    const pending = await d
      .knex('outbox')
      .where({ kind: 'session_invitation', status: 'pending' })
      .count({ n: '*' })

    expect(made).toBe(7)
    expect(again).toBe(0)
    expect(new Set(list.map((s) => s.status))).toEqual(new Set(['draft', 'open', 'closed']))
    expect(invitations.map((i: { status: string }) => i.status).slice(0, 4)).toEqual([
      'done',
      'in_progress',
      'in_progress',
      'opened',
    ])
    expect(invitations[1].answered).toBe(6)
    expect(closed.doneCount).toBe(closed.invitedCount)
    expect(
      list
        .filter((s) => s.timePointLabel)
        .map((s) => s.timePointLabel)
        .sort(),
    ).toEqual(['day 0', 'week 2'])
    // Eight players of the open rating session and four of the open play-test; the closed
    // sessions' invitations went out back then.
    expect(Number(pending[0].n)).toBe(12)
    await d.close()
  })
})
