import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'
import { addClip, addRecipe, isoDay } from './sessionFixtures'

// Second takes through the session routes: the designer hears, in plain words, which recipes
// have one take where a trial serves a recipe twice; opening such a session asks for the
// warning to be accepted and keeps who did, and when.

let t: TestApp
let developer: Agent
beforeAll(async () => {
  t = await buildApp()
  developer = await signInAs(t.app, 'developer')
})
afterAll(() => t.close())

async function twoRecipes(takes: [number, number]) {
  const recipeIds = [await addRecipe(t.knex, 'Take A'), await addRecipe(t.knex, 'Take B')]
  const performer = `PF-K${Math.random().toString(36).slice(2, 7)}`
  const clips = await Promise.all(
    recipeIds.map(async (id, r) => {
      const ids: number[] = []
      for (let k = 0; k < takes[r]; k++) ids.push(await addClip(t.knex, id, { performer }))
      return ids
    }),
  )
  return { recipeIds, performer, clips }
}

const triangle = (recipeIds: number[], clipSets: unknown[]) => ({
  name: 'Takes check',
  playerTitle: 'Listening session',
  format: 'triangle',
  recipeIds,
  clipSets,
  duplicates: 0,
  deadline: isoDay(new Date(), 7),
})

describe('second takes', () => {
  it('warns about a recipe with one take and refuses to open until the warning is accepted', async () => {
    const { recipeIds, clips } = await twoRecipes([2, 1])
    const created = await developer
      .post('/api/sessions')
      .send(
        triangle(recipeIds, [
          { key: 'set', clipIds: [clips[0][0], clips[1][0]], twinClipIds: [clips[0][1]] },
        ]),
      )
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    const session = created.body.session
    expect(session.clipSets[0].twins.map((c: { id: number }) => c.id)).toEqual([clips[0][1]])
    expect(session.sameTakeWarnings).toHaveLength(1)
    expect(session.sameTakeWarnings[0]).toMatch(/Take B .* has one take/)
    expect(session.sameTakeWarnings[0]).toMatch(/compare the two files/)
    expect(session.sameTakeWarnings[0]).not.toMatch(/Take A/)

    const refused = await developer.post(`/api/sessions/${session.id}/open`)
    expect(refused.status).toBe(422)
    expect(refused.body.error.fields.acceptSameTake[0]).toMatch(/Take B/)
    expect((await developer.get(`/api/sessions/${session.id}`)).body.session.status).toBe('draft')

    const opened = await developer
      .post(`/api/sessions/${session.id}/open`)
      .send({ acceptSameTake: true })
    expect(opened.status).toBe(200)
    expect(opened.body.session.sameTakeAccepted.by).toBe('developer@ringdown.test')
    const audit = await t
      .knex('audit_log')
      .where({ action: 'session.opened', target_id: String(session.id) })
      .first('details')
    expect(JSON.parse(audit.details)).toMatchObject({ sameTake: true })
  })

  it('opens without a question when every recipe has a second take', async () => {
    const { recipeIds, clips } = await twoRecipes([2, 2])
    const created = await developer.post('/api/sessions').send(
      triangle(recipeIds, [
        {
          key: 'set',
          clipIds: [clips[0][0], clips[1][0]],
          twinClipIds: [clips[0][1], clips[1][1]],
        },
      ]),
    )
    expect(created.body.session.sameTakeWarnings).toEqual([])
    const opened = await developer.post(`/api/sessions/${created.body.session.id}/open`)
    expect(opened.status).toBe(200)
    expect(opened.body.session.sameTakeAccepted).toBeNull()
  })

  it('asks nothing of a rating session without repeats, which never serves a recipe twice', async () => {
    const { recipeIds, clips } = await twoRecipes([1, 1])
    const created = await developer.post('/api/sessions').send({
      ...triangle(recipeIds, [{ key: 'set', clipIds: [clips[0][0], clips[1][0]] }]),
      format: 'rating',
    })
    expect(created.body.session.sameTakeWarnings).toEqual([])
    const withRepeats = await saveEdit(developer, `/api/sessions/${created.body.session.id}`, {
      duplicates: 1,
    })
    expect(withRepeats.body.session.sameTakeWarnings).toHaveLength(1)
  })

  it('refuses a second take from other conditions, of a recipe not played, or used twice', async () => {
    const { recipeIds, clips } = await twoRecipes([2, 1])
    const stranger = await addClip(t.knex, recipeIds[0], { performer: 'PF-ELSEWHERE' })
    const other = await addRecipe(t.knex, 'Take C')
    const notPlayed = await addClip(t.knex, other)
    const main = [clips[0][0], clips[1][0]]
    const tries = [
      [[stranger], /recorded in other conditions/],
      [[notPlayed], /(not in the session|does not play)/],
      [[clips[0][1], clips[0][1]], /(two places|two second takes|listed twice)/],
      [[main[1]], /(two places|listed twice)/],
    ] as const
    for (const [twinClipIds, message] of tries) {
      const res = await developer
        .post('/api/sessions')
        .send(triangle(recipeIds, [{ key: 'set', clipIds: main, twinClipIds }]))
      expect(res.status, JSON.stringify(twinClipIds)).toBe(422)
      expect(res.body.error.fields.clipSets.join(' ')).toMatch(message)
    }
  })
})
