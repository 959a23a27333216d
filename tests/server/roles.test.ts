import { afterAll, describe, expect, it } from 'vitest'
import { z } from 'zod'
import { ROLES } from '../../shared/constants'
import type { MountedTable } from '../../server/app'
import { INPUT_PARTS, type RouteDef } from '../../server/http/routeTable'
import { buildApp, memoryMailbox, type TestApp } from './helpers'

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
afterAll(() => t.close())

// Who may call what is tested against the README's own table in security/roleTable.test.ts;
// these are the rules every route table entry keeps.

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
        // Readiness says only ok or not per part; metrics check their reader in their own step
        // (this machine, or the metrics token).
        'get /api/health/ready',
        'get /metrics',
        'post /api/auth/login',
        'post /api/auth/logout',
        'get /api/auth/me',
        'post /api/auth/forgot',
        'post /api/auth/link',
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

  it('reads player tokens on GETs from a header, answering a missing one as a bad link', () => {
    const tokenGets = cases.filter((c) => c.path.startsWith('/api/player/') && c.def.headers)
    expect(tokenGets.map(label).sort()).toEqual(
      ['get /api/player/invitation', 'get /api/player/plan', 'get /api/player/state'].sort(),
    )
    for (const c of tokenGets) {
      expect(c.def.query, label(c)).toBeUndefined()
      expect(c.def.onInvalid?.headers, label(c)).toBeTypeOf('function')
    }
  })
})
