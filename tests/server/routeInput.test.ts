import { mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, expectTypeOf, it } from 'vitest'
import express, { type Request, type Response } from 'express'
import request from 'supertest'
import pino from 'pino'
import { z } from 'zod'
import { buildRouter, route, type RouteInput } from '../../server/http/routeTable'
import { withInput } from '../../server/http/validate'
import { errorHandler } from '../../server/http/errorHandler'
import { AppError, invalidToken } from '../../server/errors'
import type { UserRow } from '../../server/auth/accounts'
import { mediaFolders } from '../../server/clips/storage'
import { buildApp, memoryMailbox, signInAs, type Agent, type TestApp } from './helpers'

// Status codes as RFC 9110 defines them: 400 Bad Request (§15.5.1), 401 Unauthorized (§15.5.2),
// 403 Forbidden (§15.5.4), 422 Unprocessable Content (§15.5.21: the request is well-formed but
// its content cannot be processed). Coercion as zod documents `z.coerce.number()`: the input
// goes through Number(), so the string "42" of a path or query becomes the number 42.

const idParam = z.object({ id: z.coerce.number().int().positive('A positive number') })
const pageQuery = z.object({ limit: z.coerce.number().int().max(50).default(10) })
const nameBody = z.strictObject({ name: z.string().min(1, 'Required') })

const seen: RouteInput[] = []

const table = [
  route({
    method: 'get',
    path: '/items/:id',
    roles: ['admin'],
    params: idParam,
    query: pageQuery,
    handler: (_req, res, input) => {
      expectTypeOf(input.params.id).toEqualTypeOf<number>()
      expectTypeOf(input.query.limit).toEqualTypeOf<number>()
      expectTypeOf(input.body).toEqualTypeOf<undefined>()
      seen.push(input)
      res.json(input)
    },
  }),
  route({
    method: 'put',
    path: '/items/:id',
    roles: ['admin', 'developer'],
    params: idParam,
    body: nameBody,
    handler: (_req, res, input) => {
      expectTypeOf(input.body).toEqualTypeOf<{ name: string }>()
      seen.push(input)
      res.json(input)
    },
  }),
  route({
    method: 'get',
    path: '/link',
    roles: 'public',
    query: z.object({ token: z.string().min(1) }),
    onInvalid: { query: () => invalidToken('This link has no token') },
    handler: (_req, res, input) => {
      seen.push(input)
      res.json(input)
    },
  }),
  route({
    method: 'post',
    path: '/guarded',
    roles: 'public',
    // Stands in for an upload or a rate limit: it answers before any field is looked at.
    before: [(_req, _res, next) => next(new AppError('payload_too_large', 'Too large'))],
    body: nameBody,
    handler: (_req, res, input) => {
      seen.push(input)
      res.json(input)
    },
  }),
]

// A bare app around the route table: a header stands in for the session cookie.
const app = express()
app.use(express.json())
app.use((req, _res, next) => {
  const role = req.get('x-role')
  if (role) req.user = { id: 1, role } as UserRow
  next()
})
app.use(buildRouter(table))
app.use(errorHandler(pino({ level: 'silent' })))

const as = (role: string | null) => ({
  get: (url: string) => {
    const req = request(app).get(url)
    return role ? req.set('x-role', role) : req
  },
  put: (url: string, body: object) => {
    const req = request(app).put(url).send(body)
    return role ? req.set('x-role', role) : req
  },
})

function handled(): number {
  return seen.splice(0).length
}

describe('the validate step', () => {
  it('hands the handler coerced values, with defaults filled in', async () => {
    const res = await as('admin').get('/items/42?limit=5')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ params: { id: 42 }, query: { limit: 5 } })
    expect(seen[0]).toEqual({ params: { id: 42 }, query: { limit: 5 }, body: undefined })
    handled()

    const defaulted = await as('admin').get('/items/7')
    expect(defaulted.body.query).toEqual({ limit: 10 })
    handled()
  })

  it('refuses a bad path parameter with 422 naming the field, before the handler', async () => {
    const res = await as('admin').get('/items/abc')
    expect(res.status).toBe(422)
    expect(res.body.error).toMatchObject({
      code: 'validation_failed',
      message: 'Some fields need attention',
    })
    expect(Object.keys(res.body.error.fields)).toEqual(['id'])
    expect(handled()).toBe(0)
  })

  it('refuses a bad query value with 422 naming the field', async () => {
    const res = await as('admin').get('/items/3?limit=500')
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toEqual(['limit'])
    expect(handled()).toBe(0)
  })

  it('refuses a bad or unknown body field with 422 naming it', async () => {
    const empty = await as('developer').put('/items/3', { name: '' })
    expect(empty.status).toBe(422)
    expect(empty.body.error.fields).toEqual({ name: ['Required'] })

    const extra = await as('developer').put('/items/3', { name: 'A', colour: 'red' })
    expect(extra.status).toBe(422)
    expect(extra.body.error.fields).toEqual({ colour: ['Unknown field'] })
    expect(handled()).toBe(0)

    const good = await as('developer').put('/items/3', { name: 'A' })
    expect(good.body).toEqual({ params: { id: 3 }, body: { name: 'A' } })
    handled()
  })

  it('checks the path before the body: the first failing part answers', async () => {
    const res = await as('admin').put('/items/0', { name: '' })
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toEqual(['id'])
  })

  it('checks roles first: a caller without access learns nothing of the input', async () => {
    const anonymous = await as(null).get('/items/abc?limit=x')
    expect(anonymous.status).toBe(401)
    expect(anonymous.body.error.code).toBe('unauthenticated')

    const analyst = await as('analyst').put('/items/abc', { name: '' })
    expect(analyst.status).toBe(403)
    expect(analyst.body.error.code).toBe('forbidden')
    expect(handled()).toBe(0)
  })

  it('runs `before` middleware ahead of the body check', async () => {
    const res = await request(app).post('/guarded').send({ name: '' })
    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
    expect(handled()).toBe(0)
  })

  it('answers with the route’s own error where it names one for a part', async () => {
    const res = await as(null).get('/link')
    expect(res.status).toBe(400)
    expect(res.body.error).toEqual({ code: 'invalid_token', message: 'This link has no token' })

    const good = await as(null).get('/link?token=abc&extra=1')
    expect(good.body).toEqual({ query: { token: 'abc' } })
    handled()
  })

  it('calls the handler in the same tick and returns what it returns', () => {
    const answer = Promise.resolve()
    let got: unknown
    const step = withInput(
      route({
        method: 'put',
        path: '/:id',
        roles: 'public',
        params: idParam,
        handler: (_req, _res, input) => {
          got = input
          return answer
        },
      }),
    )
    const req = { params: { id: '9' } } as unknown as Request
    const out = step(req, {} as Response, () => {})
    expect(out).toBe(answer)
    expect(got).toEqual({ params: { id: 9 }, query: undefined, body: undefined })
  })

  it('does not read a part it declares no schema for', () => {
    let queryRead = false
    const req = {
      params: { id: '1' },
      get query() {
        queryRead = true
        return {}
      },
    } as unknown as Request
    const step = withInput(
      route({ method: 'get', path: '/:id', roles: 'public', params: idParam, handler: () => {} }),
    )
    step(req, {} as Response, () => {})
    expect(queryRead).toBe(false)
  })
})

describe('the app’s own routes', () => {
  const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-input-'))
  let t: TestApp
  let analyst: Agent
  let developer: Agent
  beforeAll(async () => {
    t = await buildApp({ mailbox: memoryMailbox(), config: { mediaDir } })
    analyst = await signInAs(t.app, 'analyst')
    developer = await signInAs(t.app, 'developer')
  })
  afterAll(async () => {
    await t.close()
    rmSync(mediaDir, { recursive: true, force: true })
  })

  const leftInIncoming = () => {
    try {
      return readdirSync(mediaFolders(mediaDir).incoming)
    } catch {
      return []
    }
  }

  it('take a recording’s file before its fields: no file is 400 whatever they say', async () => {
    const res = await developer.post('/api/clips').field('kind', 'sung')
    expect(res.status).toBe(400)
    expect(res.body.error).toEqual({
      code: 'bad_request',
      message: 'Attach the recording in the field "file"',
    })
  })

  it('refuse a recording’s bad fields with 422 and leave no upload behind', async () => {
    const res = await developer
      .post('/api/clips')
      .field('kind', 'sung')
      .attach('file', Buffer.from('RIFF....WAVE'), { filename: 'take.wav' })
    expect(res.status).toBe(422)
    expect(res.body.error.fields.kind).toBeDefined()
    expect(leftInIncoming()).toEqual([])
  })

  it('check roles before input', async () => {
    const anonymous = await request(t.app).patch('/api/clips/abc').send({ kind: 'sung' })
    expect(anonymous.status).toBe(401)
    const refused = await analyst.patch('/api/clips/abc').send({ kind: 'sung' })
    expect(refused.status).toBe(403)
  })

  it('name the field of a bad path parameter', async () => {
    const res = await analyst.get('/api/clips/abc')
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toEqual(['id'])
  })

  it('answer a player link without a token with invalid_token, not 422', async () => {
    for (const path of ['/api/player/invitation', '/api/player/state', '/api/player/plan']) {
      const res = await request(t.app).get(path)
      expect(res.status, path).toBe(400)
      expect(res.body.error.code, path).toBe('invalid_token')
    }
  })

  it('refuse a player write without a token as a form, with 422', async () => {
    const res = await request(t.app).put('/api/player/answers/x').send({})
    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toEqual(['trialIndex'])
    const noToken = await request(t.app).put('/api/player/answers/0').send({})
    expect(noToken.status).toBe(422)
    expect(Object.keys(noToken.body.error.fields)).toContain('token')
  })
})
