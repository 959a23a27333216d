import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'
import type { Recipe } from '../../shared/schemas/recipes'

let t: TestApp
let developer: Agent
let analyst: Agent

const base = {
  name: 'Corvin G test',
  instrument: 'violin',
  stringName: 'G',
  core: 'synthetic multifilament',
  windings: [
    { material: 'silver', profile: 'round', wireMm: 0.12 },
    { material: 'silver', profile: 'flat', wireMm: 0.1 },
  ],
  dampingKind: 'compound',
  dampingGrade: 'V-40',
  gaugeMm: 0.8,
  tensionN: 45,
  vibratingLengthMm: 328,
}

beforeAll(async () => {
  t = await buildApp()
  developer = await signInAs(t.app, 'developer')
  analyst = await signInAs(t.app, 'analyst')
})
afterAll(() => t.close())

describe('recipes', () => {
  it('lists the demo recipes for every staff role', async () => {
    const res = await analyst.get('/api/recipes')
    expect(res.status).toBe(200)
    const names = res.body.recipes.map((r: Recipe) => r.name)
    expect(names).toContain('Aurel A heavy compound')
    const heavy = res.body.recipes.find((r: Recipe) => r.name === 'Aurel A heavy compound')
    expect(heavy.parentName).toBe('Aurel A light compound')
  })

  it('creates a recipe with its winding layers in order and audits it', async () => {
    const res = await developer.post('/api/recipes').send(base)
    expect(res.status).toBe(201)
    expect(res.body.recipe.windings.map((w: { profile: string }) => w.profile)).toEqual([
      'round',
      'flat',
    ])
    expect(res.body.recipe.createdBy).toBe('developer@ringdown.test')
    // The demo recipes are made through the same service, so count this recipe's own entry.
    const audit = await t
      .knex('audit_log')
      .where({ action: 'recipe.created', target_id: String(res.body.recipe.id) })
    expect(audit).toHaveLength(1)
  })

  it('refuses a string the instrument does not have', async () => {
    const res = await developer
      .post('/api/recipes')
      .send({ ...base, name: 'Wrong string', instrument: 'cello', stringName: 'E' })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.stringName[0]).toMatch(/cello has the strings C, G, D, A/)
  })

  it.each([
    ['a gauge of 0 mm', { gaugeMm: 0 }, 'gaugeMm'],
    ['a vibrating length of 5 m', { vibratingLengthMm: 5000 }, 'vibratingLengthMm'],
    ['an unknown core', { core: 'titanium rope' }, 'core'],
    [
      'a winding without wire size',
      { windings: [{ material: 'silver', profile: 'round' }] },
      'windings.wireMm',
    ],
    ['an unknown field', { colour: 'red' }, 'colour'],
  ])('refuses %s with a message at the field', async (_label, change, field) => {
    const before = await t.knex('recipes').count({ n: '*' })
    const res = await developer.post('/api/recipes').send({ ...base, name: 'Bad', ...change })
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toContain(field)
    expect(await t.knex('recipes').count({ n: '*' })).toEqual(before)
  })

  it('refuses a second recipe with the same name and version', async () => {
    const res = await developer.post('/api/recipes').send({ ...base })
    expect(res.status).toBe(409)
  })

  it('filters by instrument, damping and search text', async () => {
    const cello = await analyst.get('/api/recipes').query({ instrument: 'cello' })
    expect(cello.body.recipes.every((r: Recipe) => r.instrument === 'cello')).toBe(true)
    const fibre = await analyst.get('/api/recipes').query({ dampingKind: 'fibre layer' })
    expect(fibre.body.recipes.map((r: Recipe) => r.name)).toEqual(['Aurel A fibre wrap'])
    const text = await analyst.get('/api/recipes').query({ q: 'Tessel' })
    expect(text.body.recipes).toHaveLength(2)
  })

  it('edits a recipe and refuses a parent loop', async () => {
    const list = (await developer.get('/api/recipes')).body.recipes as Recipe[]
    const bare = list.find((r) => r.name === 'Aurel A bare')!
    const heavy = list.find((r) => r.name === 'Aurel A heavy compound')!
    const loop = await saveEdit(developer, `/api/recipes/${bare.id}`, { parentId: heavy.id })
    expect(loop.status).toBe(422)
    expect(loop.body.error.fields.parentId[0]).toMatch(/descend from itself/)
    const ok = await saveEdit(developer, `/api/recipes/${heavy.id}`, { status: 'retired' })
    expect(ok.body.recipe.status).toBe('retired')
  })

  it('lets analysts read but not write, and anonymous callers nothing', async () => {
    expect((await analyst.post('/api/recipes').send(base)).status).toBe(403)
    expect((await request(t.app).get('/api/recipes')).status).toBe(401)
  })
})
