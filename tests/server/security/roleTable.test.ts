import { readFileSync } from 'node:fs'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { STAFF_ROLES, type StaffRole } from '../../../shared/constants'
import type { MountedTable } from '../../../server/app'
import { mediaFolders } from '../../../server/clips/storage'
import {
  buildApp,
  createStaff,
  memoryMailbox,
  signInAs,
  type Agent,
  type TestApp,
} from '../helpers'
import { addPlayers, isoDay, openStudy, studyFixture } from '../sessionFixtures'
import { giveAudio } from '../playerFixtures'

// The expectations are the README's role table, written by hand, not the route tables the app
// is built from: a route given the wrong roles, or a session route without the ownership rule,
// answers otherwise than the table and fails here. A route missing from the table fails too.

type Cell = 'yes' | 'no' | 'own'
interface Row {
  method: 'get' | 'post' | 'patch' | 'put' | 'delete'
  path: string
  anyone: Cell
  roles: Record<StaffRole, Cell>
}

function readTable(): Row[] {
  const readme = readFileSync(resolve(import.meta.dirname, '../../../README.md'), 'utf8')
  const block = /<!-- role-table -->([\s\S]*?)<!-- \/role-table -->/.exec(readme)?.[1]
  if (!block) throw new Error('README.md has no role table')
  const cell = (text: string): Cell =>
    text === '✓' ? 'yes' : text === '–' ? 'no' : text === 'own' ? 'own' : (undefined as never)
  return block
    .split('\n')
    .filter((line) => line.startsWith('| `'))
    .map((line) => {
      const [route, anyone, admin, developer, analyst] = line
        .split('|')
        .slice(1, -1)
        .map((c) => c.trim())
      const [method, path] = route.replace(/`/g, '').split(' ')
      const row: Row = {
        method: method.toLowerCase() as Row['method'],
        path,
        anyone: cell(anyone),
        roles: { admin: cell(admin), developer: cell(developer), analyst: cell(analyst) },
      }
      for (const c of [row.anyone, ...Object.values(row.roles)])
        if (!c) throw new Error(`README role table: a cell of ${route} is not ✓, – or own`)
      return row
    })
}

const rows = readTable()
const label = (r: { method: string; path: string }) => `${r.method.toUpperCase()} ${r.path}`

// Built at collection time only to list its routes; the calls go to a fresh app below.
const listing = await buildApp({ mailbox: memoryMailbox() })
const mounted: MountedTable[] = listing.app.locals.tables
const appRoutes = mounted.flatMap((t) =>
  t.routes.map((r) => label({ method: r.method, path: t.prefix + (r.path === '/' ? '' : r.path) })),
)
await listing.close()

let t: TestApp
let mediaDir: string
const agents = {} as Record<StaffRole, Agent>
/** Ids for the `:id` of each kind of path, and the same for a colleague's session. */
let own: { session: number; invitation: number }
let other: { session: number; invitation: number }
let ids: { player: number; user: number }

async function openedWithInvitation(agent: Agent, name: string) {
  const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1, name)
  await giveAudio(
    t.knex,
    mediaDir,
    clipSets.flatMap((s) => s.clipIds),
  )
  const { id } = await openStudy(agent, {
    name,
    format: 'pair',
    recipeIds,
    clipSets,
    deadline: isoDay(t.app.locals.ctx.clock.now(), 14),
  })
  const playerIds = await addPlayers(t.knex, 1)
  await agent.post(`/api/sessions/${id}/invitations`).send({ playerIds })
  const inv = await t.knex('invitations').where({ session_id: id }).first('id')
  return { session: id, invitation: inv.id as number }
}

beforeAll(async () => {
  mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-roles-'))
  mediaFolders(mediaDir)
  t = await buildApp({ config: { mediaDir }, mailbox: memoryMailbox() })
  for (const role of STAFF_ROLES) agents[role] = await signInAs(t.app, role)
  const colleague = await createStaff(t, agents.admin, 'developer')
  own = await openedWithInvitation(agents.developer, 'Own study')
  other = await openedWithInvitation(colleague.agent, 'Colleague study')
  const player = await agents.admin.post('/api/panel/players').send({
    name: 'Matrix Player',
    email: 'matrix.player@example.test',
    instruments: ['viola'],
    level: 'amateur',
  })
  const staff = (await agents.admin.get('/api/staff')).body.users as { id: number; role: string }[]
  ids = { player: player.body.player.id, user: staff.find((u) => u.role === 'analyst')!.id }
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

function url(path: string, of: { session: number; invitation: number }): string {
  const id = path.startsWith('/api/invitations/')
    ? of.invitation
    : path.startsWith('/api/sessions/') || path.startsWith('/api/findings/')
      ? of.session
      : path.startsWith('/api/panel/players/')
        ? ids.player
        : ids.user
  return path
    .replace(':id', String(id))
    .replace(':playerCode', 'P01')
    .replace(':table', 'pairs')
    .replace(':ref', 'AAAAAAAAAAAAAAAAAAAAAAAA')
    .replace(':trialIndex', '0')
}

function call(agent: Agent | ReturnType<typeof request>, row: Row, of = own) {
  const req = agent[row.method](url(row.path, of))
  return row.method === 'get' || row.method === 'delete' ? req : req.send({})
}

describe('the README role table', () => {
  it('lists every route the app serves, and nothing else', () => {
    expect(rows.map(label).sort()).toEqual([...appRoutes].sort())
  })
})

// Reads first, so that an allowed close or revoke does not change what later reads answer.
const ordered = [...rows].sort((a, b) => Number(a.method !== 'get') - Number(b.method !== 'get'))

describe.each(ordered)('$method $path', (row) => {
  it(row.anyone === 'yes' ? 'is open to anyone' : 'refuses nobody signed in with 401', async () => {
    const res = await call(request(t.app), row)
    if (row.anyone === 'yes') expect([401, 403]).not.toContain(res.status)
    else {
      expect(res.status).toBe(401)
      expect(res.body.error.code).toBe('unauthenticated')
    }
    expect(res.status).toBeLessThan(500)
  })

  for (const role of STAFF_ROLES) {
    const cell = row.roles[role]
    it(`${cell === 'no' ? 'refuses' : 'lets through'} ${role}${cell === 'own' ? ' on own sessions' : ''}`, async () => {
      // Open routes (sign-out among them) get an agent of their own, to keep the shared ones.
      const agent = row.anyone === 'yes' ? await signInAs(t.app, role) : agents[role]
      const res = await call(agent, row)
      if (cell === 'no') {
        expect(res.status).toBe(403)
        expect(res.body.error.code).toBe('forbidden')
      } else expect([401, 403]).not.toContain(res.status)
      expect(res.status).toBeLessThan(500)
    })
    if (cell === 'own')
      it(`refuses ${role} on a colleague's session with 403`, async () => {
        const res = await call(agents[role], row, other)
        expect(res.status).toBe(403)
        expect(res.body.error.code).toBe('forbidden')
      })
  }
})
