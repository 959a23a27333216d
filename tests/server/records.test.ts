import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { fixedClock } from '../../server/clock'
import { FINDINGS_TABLES } from '../../shared/schemas/findings'
import { up as writeOlderRecords } from '../../migrations/20261202000100_served_records_data'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'
import { addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'
import { answerFor, invitedOf, passHeadphoneCheck } from './playerFixtures'

// Findings are evidence: what a closed session's findings say must not move when the clips and
// recipes it used are edited, archived or re-versioned, and its answers must be read through
// what each player was actually served.

const clock = fixedClock(new Date('2026-11-02T09:00:00Z'))
let t: TestApp
let developer: Agent
let analyst: Agent
const api = () => request(t.app)

beforeAll(async () => {
  t = await buildApp({ clock })
  developer = await signInAs(t.app, 'developer')
  analyst = await signInAs(t.app, 'analyst')
})
afterAll(() => t.close())

/** An answered session through the player's own pages: every trial of every player. */
async function answeredSession(format: 'rating' | 'pair' | 'triangle', close = true) {
  const { recipeIds, clipSets } = await studyFixture(t.knex, 3, 2, `Record ${format}`)
  const { id } = await openStudy(developer, {
    name: `Records ${format}`,
    format,
    recipeIds,
    clipSets,
    duplicates: format === 'rating' ? 2 : 1,
    deadline: isoDay(clock.now(), 14),
  })
  const players = await addPlayers(t.knex, 4)
  await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: players }).expect(200)
  for (const [lean, p] of (await invitedOf(t, id)).entries()) {
    await api().post('/api/player/consent').send({ token: p.token }).expect(200)
    await passHeadphoneCheck(t.app, p.token)
    const { plan } = (
      await api().get('/api/player/plan').set('X-Invitation-Token', p.token).expect(200)
    ).body
    const keys = plan.attributes.map((a: { key: string }) => a.key)
    for (const trial of plan.trials)
      await api()
        .put(`/api/player/answers/${trial.index}`)
        .send({ token: p.token, answer: answerFor(trial, keys, lean * 7 + trial.index) })
        .expect(200)
  }
  if (close) await developer.post(`/api/sessions/${id}/close`).expect(200)
  return { id, recipeIds, clipIds: clipSets.flatMap((s) => s.clipIds) }
}

/** The findings JSON and every CSV export, as text, the way an analyst downloads them. */
async function evidence(id: number): Promise<Record<string, string>> {
  const out: Record<string, string> = {}
  const findings = await analyst.get(`/api/findings/${id}`)
  expect(findings.status).toBe(200)
  out.findings = findings.text
  const answers = await analyst.get(`/api/findings/${id}/export/answers.csv`)
  out['answers.csv'] = answers.text
  for (const table of FINDINGS_TABLES)
    out[`${table}.csv`] = (await analyst.get(`/api/findings/${id}/export/${table}.csv`)).text
  return out
}

describe('the served record', () => {
  it('is fixed for each invitation and is what the player is served', async () => {
    const { id } = await answeredSession('rating', false)
    const invitations = await t.knex('invitations').where({ session_id: id }).orderBy('id')
    const records = await t.knex('served_plans').where({ session_id: id })
    expect(records).toHaveLength(invitations.length)
    const [first] = await invitedOf(t, id)
    const { plan } = (await api().get('/api/player/plan').set('X-Invitation-Token', first.token))
      .body
    const record = JSON.parse(
      records.find((r: { invitation_id: number }) => r.invitation_id === invitations[0].id).trials,
    )
    expect(
      plan.trials.map((tr: { clips: { code: number }[] }) => tr.clips.map((c) => c.code)),
    ).toEqual(record.trials.map((tr: { clip: { code: number } }) => [tr.clip.code]))
    expect(Object.keys(record.renditionGainDb).length).toBeGreaterThan(0)
  })
})

describe('clips and recipes used by a session', () => {
  it("refuse a change of a clip's recipe and a delete, naming the session; nothing changes", async () => {
    const { id, clipIds, recipeIds } = await answeredSession('rating')
    const before = await evidence(id)
    const clip = clipIds[0]
    const moved = await saveEdit(developer, `/api/clips/${clip}`, { recipeId: recipeIds[1] })
    expect(moved.status).toBe(409)
    expect(moved.body.error.message).toMatch(/“Records rating” \(closed\)/)
    expect(moved.body.error.fields).toHaveProperty('recipeId')
    const deleted = await developer.delete(`/api/clips/${clip}`)
    expect(deleted.status).toBe(409)
    expect(deleted.body.error.message).toMatch(/archive it instead/)
    expect(await t.knex('clips').where({ id: clip }).first('recipe_id')).toEqual({
      recipe_id: recipeIds[0],
    })
    expect(await evidence(id)).toEqual(before)
  })

  it('refuse a construction change of a used recipe but take a new name and notes, audited', async () => {
    const { recipeIds } = await answeredSession('pair')
    const r = recipeIds[0]
    const core = await saveEdit(developer, `/api/recipes/${r}`, { core: 'gut' })
    expect(core.status).toBe(409)
    expect(core.body.error.message).toMatch(/Make a new version/)
    const words = await saveEdit(developer, `/api/recipes/${r}`, { notes: 'Settled in fine.' })
    expect(words.status).toBe(200)
    expect(words.body.recipe.notes).toBe('Settled in fine.')
    const audit = await t
      .knex('audit_log')
      .where({ action: 'recipe.updated', target_id: String(r) })
    expect(audit.length).toBeGreaterThan(0)
  })

  it('keep findings and every export byte for byte through edits, archives and new versions', async () => {
    for (const format of ['rating', 'pair', 'triangle'] as const) {
      const { id, clipIds, recipeIds } = await answeredSession(format)
      const before = await evidence(id)
      for (const clip of clipIds) {
        const noted = await saveEdit(developer, `/api/clips/${clip}`, { notes: 'Checked again' })
        expect(noted.status, JSON.stringify(noted.body)).toBe(200)
        expect((await saveEdit(developer, `/api/clips/${clip}`, { kind: 'plucked' })).status).toBe(
          409,
        )
        await developer.post(`/api/clips/${clip}/archive`).expect(200)
      }
      for (const recipe of recipeIds) {
        expect(
          (await saveEdit(developer, `/api/recipes/${recipe}`, { notes: 'Reviewed' })).status,
        ).toBe(200)
        expect(
          (await saveEdit(developer, `/api/recipes/${recipe}`, { gaugeMm: 0.71 })).status,
        ).toBe(409)
        const version = await developer
          .post(`/api/recipes/${recipe}/versions`)
          .send({ gaugeMm: 0.71 })
        expect(version.status).toBe(201)
        expect(version.body.recipe).toMatchObject({ version: 2, parentId: recipe, gaugeMm: 0.71 })
        const versioned = await t
          .knex('audit_log')
          .where({ action: 'recipe.versioned', target_id: String(version.body.recipe.id) })
        expect(versioned).toHaveLength(1)
        await developer.post(`/api/recipes/${recipe}/archive`).expect(200)
      }
      expect(await evidence(id), format).toEqual(before)
    }
  })
})

describe('archiving', () => {
  it('hides an item from lists and pickers, keeps it readable, and refuses twice', async () => {
    const { clipIds, recipeIds } = await answeredSession('triangle')
    const clip = clipIds[0]
    await developer.post(`/api/clips/${clip}/archive`).expect(200)
    const again = await developer.post(`/api/clips/${clip}/archive`)
    expect(again.status).toBe(409)
    expect(again.body.error.message).toBe('This clip is already archived')
    const listed = (await developer.get('/api/clips')).body.clips.map((c: { id: number }) => c.id)
    expect(listed).not.toContain(clip)
    const all = (await developer.get('/api/clips?archived=include')).body.clips
    expect(all.find((c: { id: number }) => c.id === clip).archivedAt).toBe(
      clock.now().toISOString(),
    )
    const sets = JSON.stringify((await developer.get('/api/clips/matched-sets')).body)
    expect(sets).not.toContain(`"id":${clip},`)
    expect((await developer.get(`/api/clips/${clip}`)).status).toBe(200)
    await developer.post(`/api/clips/${clip}/restore`).expect(200)
    expect((await developer.post(`/api/clips/${clip}/restore`)).status).toBe(409)

    await developer.post(`/api/recipes/${recipeIds[0]}/archive`).expect(200)
    const recipes = (await developer.get('/api/recipes')).body.recipes.map(
      (r: { id: number }) => r.id,
    )
    expect(recipes).not.toContain(recipeIds[0])
    const audit = await t.knex('audit_log').whereIn('action', ['clips.archived', 'recipe.archived'])
    expect(audit.length).toBeGreaterThanOrEqual(2)
  })

  it('deletes for good only what nothing uses', async () => {
    const { recipeIds: used } = await answeredSession('rating', false)
    expect((await developer.delete(`/api/recipes/${used[0]}`)).status).toBe(409)
    const fresh = await developer.post('/api/recipes').send({
      name: 'Unused sketch',
      instrument: 'violin',
      stringName: 'A',
      core: 'solid steel',
      vibratingLengthMm: 328,
    })
    expect(fresh.status).toBe(201)
    await developer.delete(`/api/recipes/${fresh.body.recipe.id}`).expect(200)
    expect(await t.knex('recipes').where({ id: fresh.body.recipe.id }).first()).toBeUndefined()
  })
})

describe('sessions answered before records were kept', () => {
  it('get their records rebuilt from the seed, the same as they were served', async () => {
    const { id } = await answeredSession('pair')
    const before = await evidence(id)
    const kept = await t.knex('served_plans').where({ session_id: id }).orderBy('invitation_id')
    await t.knex('served_plans').where({ session_id: id }).delete()
    await writeOlderRecords(t.knex)
    const rebuilt = await t.knex('served_plans').where({ session_id: id }).orderBy('invitation_id')
    expect(rebuilt.map((r: { trials: string }) => JSON.parse(r.trials))).toEqual(
      kept.map((r: { trials: string }) => JSON.parse(r.trials)),
    )
    expect(await evidence(id)).toEqual(before)
  })

  it('say so on their page, and findings refuse, when an answer disagrees with the rebuilt plan', async () => {
    const { id, recipeIds } = await answeredSession('rating')
    await t.knex('served_plans').where({ session_id: id }).delete()
    // What the record would have caught: a clip moved to another recipe behind the session.
    const design = await t.knex('sessions').where({ id }).first('clip_sets')
    const clip = JSON.parse(design.clip_sets)[0].clipIds[0]
    await t.knex('clips').where({ id: clip }).update({ recipe_id: recipeIds[2] })
    await writeOlderRecords(t.knex)
    const session = (await developer.get(`/api/sessions/${id}`)).body.session
    expect(session.recordProblem).toMatch(/disagrees: it was served other recordings/)
    const findings = await analyst.get(`/api/findings/${id}`)
    expect(findings.status).toBe(409)
    expect(findings.body.error.message).toMatch(/served record could not be rebuilt/)
  })
})

describe('findings provenance', () => {
  it('names the answers, players, exclusions, last answer and last change counted', async () => {
    const { id } = await answeredSession('rating')
    const res = await analyst.get(`/api/findings/${id}`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const f = res.body
    const answers = await t
      .knex('answers as a')
      .join('invitations as i', 'i.id', 'a.invitation_id')
      .where('i.session_id', id)
      .count({ n: '*' })
    expect(f.provenance).toEqual({
      answers: Number(answers[0].n),
      players: 4,
      excluded: 0,
      headphoneExcluded: 0,
      lastAnswerAt: clock.now().toISOString(),
      lastChange: { action: 'session.closed', at: clock.now().toISOString() },
    })
  })
})
