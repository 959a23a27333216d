import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { buildApp, memoryMailbox, signInAs, type Agent, type TestApp } from '../helpers'

// Keys that name members every JavaScript object inherits (ECMA-262 §20.1.3, Object.prototype):
// a body carrying one is ordinary bad input, answered like any unknown field (RFC 9110 §15.5.21,
// 422 Unprocessable Content), never with a 500.
const HOSTILE_KEYS = ['toString', 'constructor', '__proto__', 'hasOwnProperty', 'valueOf']

let t: TestApp
let admin: Agent
beforeAll(async () => {
  t = await buildApp({ mailbox: memoryMailbox() })
  admin = await signInAs(t.app, 'admin')
})
afterAll(() => t.close())

/** JSON text with the key written literally: an object literal would eat "__proto__". */
const bodyWith = (base: Record<string, unknown>, key: string) =>
  JSON.stringify(base).replace(/^\{/, `{${JSON.stringify(key)}:"x",`)

describe('bodies with keys named after inherited members', () => {
  it.each(HOSTILE_KEYS)('sign-in answers 422 naming "%s"', async (key) => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .set('Content-Type', 'application/json')
      .send(bodyWith({ email: 'a@b.test', password: 'whatever-it-is' }, key))
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toContain(key)
    expect(res.body.error.fields[key]).toEqual(['Unknown field'])
  })

  it.each(HOSTILE_KEYS)(
    'a recipe create answers 422 naming "%s" and stores nothing',
    async (key) => {
      const before = (await admin.get('/api/recipes')).body.recipes.length
      const res = await admin
        .post('/api/recipes')
        .set('Content-Type', 'application/json')
        .send(bodyWith({ name: 'Hostile key recipe' }, key))
      expect(res.status).toBe(422)
      expect(Object.keys(res.body.error.fields)).toContain(key)
      expect((await admin.get('/api/recipes')).body.recipes.length).toBe(before)
    },
  )

  it('a nested hostile key is named by its path', async () => {
    const res = await admin
      .post('/api/panel/players')
      .set('Content-Type', 'application/json')
      .send(
        '{"name":"N","email":"n@example.test","instruments":["viola"],"level":"amateur","constructor":{"x":1}}',
      )
    expect(res.status).toBe(422)
    expect(res.body.error.fields.constructor).toEqual(['Unknown field'])
  })
})
