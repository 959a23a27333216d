import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { z } from 'zod'
import { ROLES, STAFF_ROLES, type StaffRole } from '../../shared/constants'
import type { MountedTable } from '../../server/app'
import { INPUT_PARTS, type RouteDef } from '../../server/http/routeTable'
import { buildApp, memoryMailbox, signInAs, type Agent, type TestApp } from './helpers'

// The app is built at collection time so the table of cases is known before tests are declared.
const t: TestApp = await buildApp({ mailbox: memoryMailbox() })
const tables: MountedTable[] = t.app.locals.tables

interface Case {
  method: RouteDef['method']
  path: string
  roles: RouteDef['roles']
  def: RouteDef
}

const cases: Case[] = tables.flatMap((table) =>
  table.routes.map((r) => ({
    method: r.method,
    path: (table.prefix + (r.path === '/' ? '' : r.path)).replace(/\/$/, ''),
    roles: r.roles,
    def: r,
  })),
)
const guarded = cases.filter((c) => c.roles !== 'public')

const agents = {} as Record<StaffRole, Agent>
let ids: { player: number; user: number }

beforeAll(async () => {
  for (const role of STAFF_ROLES) agents[role] = await signInAs(t.app, role)
  // A player made for this test alone, since an allowed DELETE will erase it.
  const player = await agents.admin.post('/api/panel/players').send({
    name: 'Matrix Player',
    email: 'matrix.player@example.test',
    instruments: ['viola'],
    level: 'amateur',
  })
  const analyst = await agents.admin.get('/api/staff')
  ids = {
    player: player.body.player.id,
    user: analyst.body.users.find((u: { role: string }) => u.role === 'analyst').id,
  }
})
afterAll(() => t.close())

function url(c: Case): string {
  return c.path.replace(':id', String(c.path.includes('/players/') ? ids.player : ids.user))
}

function call(agent: Agent | ReturnType<typeof request>, c: Case) {
  const req = agent[c.method](url(c))
  return c.method === 'get' || c.method === 'delete' ? req : req.send({})
}

describe('route tables', () => {
  it('list a role rule for every route, naming only known roles', () => {
    expect(cases.length).toBeGreaterThan(10)
    for (const c of cases) {
      const ok =
        c.roles === 'public' ||
        (Array.isArray(c.roles) &&
          c.roles.length > 0 &&
          c.roles.every((r) => (ROLES as readonly string[]).includes(r)))
      expect(ok, `${c.method.toUpperCase()} ${c.path}`).toBe(true)
    }
  })

  it('keep staff and panel administration away from the public', () => {
    const open = cases.filter((c) => c.roles === 'public').map((c) => `${c.method} ${c.path}`)
    expect(open.sort()).toEqual(
      [
        'get /api/health',
        'post /api/auth/login',
        'post /api/auth/logout',
        'get /api/auth/me',
        'post /api/auth/forgot',
        'get /api/auth/link',
        'post /api/auth/set-password',
        'get /api/player/invitation',
        'get /api/player/state',
        'post /api/player/consent',
        'post /api/player/headphone/start',
        'post /api/player/headphone',
        'post /api/player/level',
        'get /api/player/plan',
        'get /api/player/audio/:ref',
        'put /api/player/answers/:trialIndex',
      ].sort(),
    )
  })
})

/** Writes that send no JSON body, each with why it needs no body schema. */
const NO_BODY: Record<string, string> = {
  'post /api/auth/logout': 'signs out whoever the cookie names; nothing is sent',
  'post /api/clips/batch': 'multipart: a manifest and its files, checked row by row by the import',
  'post /api/panel/import': 'multipart: one CSV file, checked row by row by the import',
  'post /api/staff/:id/resend-invite': 'an action on the user named in the path',
  'post /api/mail/outbox/:id/retry': 'an action on the mail named in the path',
  'post /api/sessions/:id/close': 'an action on the session named in the path',
  'post /api/sessions/:id/remind': 'an action on the session named in the path',
  'post /api/invitations/:id/resend': 'an action on the invitation named in the path',
  'post /api/invitations/:id/remind': 'an action on the invitation named in the path',
  'post /api/invitations/:id/revoke': 'an action on the invitation named in the path',
  'post /api/clips/:id/archive': 'an action on the clip named in the path',
  'post /api/clips/:id/restore': 'an action on the clip named in the path',
  'post /api/recipes/:id/archive': 'an action on the recipe named in the path',
  'post /api/recipes/:id/restore': 'an action on the recipe named in the path',
}

const label = (c: Case) => `${c.method} ${c.path}`
const pathParams = (path: string) => [...path.matchAll(/:(\w+)/g)].map((m) => m[1]).sort()

describe('route input', () => {
  it('declares a params schema naming exactly the parameters of the path', () => {
    for (const c of cases) {
      const names = pathParams(c.path)
      if (names.length === 0) {
        expect(c.def.params, label(c)).toBeUndefined()
        continue
      }
      expect(c.def.params, label(c)).toBeInstanceOf(z.ZodObject)
      const shape = (c.def.params as z.ZodObject).shape
      expect(Object.keys(shape).sort(), label(c)).toEqual(names)
    }
  })

  it('declares a body for every post, put and patch but the listed ones', () => {
    const writes = cases.filter((c) => ['post', 'put', 'patch'].includes(c.method))
    for (const c of writes) {
      if (label(c) in NO_BODY) expect(c.def.body, label(c)).toBeUndefined()
      else expect(c.def.body, label(c)).toBeInstanceOf(z.ZodType)
    }
    // The list stays true: every exception is a route that exists.
    expect(Object.keys(NO_BODY).filter((k) => !writes.some((c) => label(c) === k))).toEqual([])
  })

  it('reads no body on a GET, and maps failures only for parts it declares', () => {
    for (const c of cases) {
      if (c.method === 'get') expect(c.def.body, label(c)).toBeUndefined()
      for (const part of INPUT_PARTS)
        if (c.def.onInvalid?.[part]) expect(c.def[part], `${label(c)} ${part}`).toBeDefined()
    }
  })

  it('answers a player GET without a token with invalid_token, as a bad link', () => {
    const tokenGets = cases.filter((c) => c.path.startsWith('/api/player/') && c.def.query)
    expect(tokenGets.map(label).sort()).toEqual(
      ['get /api/player/invitation', 'get /api/player/plan', 'get /api/player/state'].sort(),
    )
    for (const c of tokenGets) expect(c.def.onInvalid?.query, label(c)).toBeTypeOf('function')
  })
})

describe.each(guarded)('$method $path', (c) => {
  it('refuses an anonymous caller with 401', async () => {
    const res = await call(request(t.app), c)
    expect(res.status).toBe(401)
    expect(res.body.error.code).toBe('unauthenticated')
  })

  const roles = c.roles as readonly string[]
  for (const role of STAFF_ROLES) {
    if (roles.includes(role)) {
      it(`lets ${role} through`, async () => {
        const res = await call(agents[role], c)
        expect([401, 403]).not.toContain(res.status)
        expect(res.status).toBeLessThan(500)
      })
    } else {
      it(`refuses ${role} with 403`, async () => {
        const res = await call(agents[role], c)
        expect(res.status).toBe(403)
        expect(res.body.error.code).toBe('forbidden')
      })
    }
  }
})
