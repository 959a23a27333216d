import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fixedClock } from '../../server/clock'
import { computeSessionFindings } from '../../server/findings/service'
import { findingsReader } from '../../server/findings/reader'
import { CORRELATED_MEASURES } from '../../server/findings/objective'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addAnswers, addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'

// Cached findings must be exactly the findings computed afresh after every kind of change a
// session's findings read, and must not be recomputed for changes they do not read.

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

async function ratingStudy(players: number) {
  const { recipeIds, clipSets } = await studyFixture(t.knex, 3, 2, 'Cache')
  const { id } = await openStudy(developer, {
    name: 'Cache study',
    format: 'rating',
    recipeIds,
    clipSets,
    duplicates: 1,
    deadline: isoDay(clock.now(), 14),
  })
  const playerIds = await addPlayers(t.knex, players)
  const invited = await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds })
  expect(invited.status).toBe(200)
  const invitations: { id: number; player_id: number; code: string }[] = await t
    .knex('invitations as i')
    .join('players as p', 'p.id', 'i.player_id')
    .where('i.session_id', id)
    .orderBy('i.player_index')
    .select('i.id', 'i.player_id', 'p.code')
  return { id, recipeIds, invitations }
}

const trialsOf = async (invitationId: number): Promise<number> =>
  (
    JSON.parse(
      (await t.knex('served_plans').where({ invitation_id: invitationId }).first('trials')).trials,
    ) as { trials: unknown[] }
  ).trials.length

const range = (n: number) => Array.from({ length: n }, (_, i) => i)

/** The page through HTTP, and the same page computed afresh from the database. */
async function servedAndFresh(id: number, query = '') {
  const res = await analyst.get(`/api/findings/${id}${query}`)
  expect(res.status).toBe(200)
  const group = Object.fromEntries(new URLSearchParams(query.slice(1)))
  const fresh = (await computeSessionFindings(t.knex, id, group)).findings
  return { served: res.text, fresh: JSON.stringify(fresh) }
}

describe('findings served from the cache', () => {
  it('are recomputed after every change they read, and equal the findings computed afresh', async () => {
    const { id, recipeIds, invitations } = await ratingStudy(4)
    const [a, b, c, d] = invitations
    const trials = await trialsOf(a.id)
    for (const inv of [a, b, c])
      await addAnswers(t.knex, inv.id, range(trials), clock.now().toISOString())
    const reader = findingsReader(t.app.locals.ctx)
    const computed = () => reader.counts().computed

    const first = await servedAndFresh(id)
    expect(first.served).toBe(first.fresh)
    const before = computed()
    const again = await servedAndFresh(id)
    expect(again.served).toBe(first.served)
    expect(computed()).toBe(before)

    const changes: [string, () => Promise<unknown>][] = [
      ['a new answer', () => addAnswers(t.knex, d.id, [0], clock.now().toISOString())],
      [
        'a changed answer',
        () =>
          t
            .knex('answers')
            .where({ invitation_id: d.id, trial_index: 0 })
            .update({
              payload: JSON.stringify({ kind: 'rating', values: { brightness: 7 } }),
            }),
      ],
      [
        'a deleted answer',
        () => t.knex('answers').where({ invitation_id: d.id, trial_index: 0 }).delete(),
      ],
      [
        'an exclusion',
        () =>
          analyst
            .post(`/api/findings/${id}/exclusions`)
            .send({ playerCode: b.code, reason: 'Rated with the wrong headphones' }),
      ],
      [
        'taking the player back',
        () =>
          analyst
            .delete(`/api/findings/${id}/exclusions/${b.code}`)
            .send({ reason: 'Headphones were fine after all' }),
      ],
      [
        'a finished player',
        () =>
          t
            .knex('invitations')
            .where({ id: c.id })
            .update({ completed_at: clock.now().toISOString() }),
      ],
      [
        'a revoked invitation',
        () =>
          t
            .knex('invitations')
            .where({ id: c.id })
            .update({ revoked_at: clock.now().toISOString() }),
      ],
      [
        'a renamed session',
        () => t.knex('sessions').where({ id }).update({ name: 'Cache study, renamed' }),
      ],
      [
        'a renamed recipe',
        () => t.knex('recipes').where({ id: recipeIds[0] }).update({ name: 'Renamed recipe' }),
      ],
      [
        'a player who changed level',
        () => t.knex('players').where({ id: a.player_id }).update({ level: 'student' }),
      ],
      [
        'a re-measured clip',
        () =>
          t
            .knex('clips')
            .whereIn('recipe_id', recipeIds)
            .update({ [CORRELATED_MEASURES[1].column]: t.knex.raw('id * 10') }),
      ],
      [
        'an audited session change',
        () =>
          t.knex('audit_log').insert({
            at: clock.now().toISOString(),
            action: 'session.updated',
            target_type: 'session',
            target_id: String(id),
          }),
      ],
    ]
    for (const [what, change] of changes) {
      const previous = (await servedAndFresh(id)).served
      const count = computed()
      await change()
      const after = await servedAndFresh(id)
      expect(after.served, what).toBe(after.fresh)
      expect(after.served, `${what} changes the page`).not.toBe(previous)
      expect(computed(), what).toBe(count + 1)
    }

    // A subgroup is a page of its own, kept and invalidated the same way.
    const students = await servedAndFresh(id, '?level=student')
    expect(students.served).toBe(students.fresh)
    await addAnswers(t.knex, d.id, [1], clock.now().toISOString())
    const studentsAfter = await servedAndFresh(id, '?level=student')
    expect(studentsAfter.served).toBe(studentsAfter.fresh)
  })

  it('are not recomputed for changes elsewhere', async () => {
    const one = await ratingStudy(2)
    const other = await ratingStudy(2)
    const trials = await trialsOf(one.invitations[0].id)
    await addAnswers(t.knex, one.invitations[0].id, range(trials), clock.now().toISOString())
    const reader = findingsReader(t.app.locals.ctx)
    await servedAndFresh(one.id)
    await addAnswers(t.knex, other.invitations[0].id, [0, 1], clock.now().toISOString())
    await analyst
      .post(`/api/findings/${other.id}/exclusions`)
      .send({ playerCode: other.invitations[1].code, reason: 'Left early' })
    await t.knex('outbox').insert({
      to: 'someone@example.test',
      subject: 'Hello',
      text: 'Hello',
      html: '<p>Hello</p>',
      kind: 'test',
      status: 'pending',
      created_at: clock.now().toISOString(),
    })
    // The other session's exclusion computed that session's page; ours stays as it was.
    const count = reader.counts().computed
    const { served, fresh } = await servedAndFresh(one.id)
    expect(served).toBe(fresh)
    expect(reader.counts().computed).toBe(count)
  })

  it('follow the answers of a later time point in the first one’s trend', async () => {
    const { id, invitations } = await ratingStudy(3)
    const trials = await trialsOf(invitations[0].id)
    for (const inv of invitations)
      await addAnswers(t.knex, inv.id, range(trials), clock.now().toISOString())
    const added = await developer.post(`/api/sessions/${id}/time-points`).send({
      label: 'After six weeks',
      deadline: isoDay(clock.now(), 60),
      inviteSamePlayers: true,
    })
    expect(added.status).toBe(201)
    const later = added.body.session.id as number
    expect(added.body.session.status).toBe('open')
    const before = await servedAndFresh(id)
    expect(before.served).toBe(before.fresh)
    const laterInvitations: { id: number }[] = await t
      .knex('invitations')
      .where({ session_id: later })
      .select('id')
    for (const inv of laterInvitations)
      await addAnswers(t.knex, inv.id, range(trials), clock.now().toISOString())
    const after = await servedAndFresh(id)
    expect(after.served).toBe(after.fresh)
    expect(JSON.parse(after.served).aging).not.toBeNull()
  })
})
