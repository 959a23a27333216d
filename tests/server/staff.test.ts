import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { fixedClock } from '../../server/clock'
import { updateStaff } from '../../server/staff/service'
import {
  buildApp,
  createStaff,
  DEMO,
  lastMailTo,
  linkToken,
  signIn,
  signInAs,
  uniqueEmail,
  whoIs,
  type Agent,
  type TestApp,
} from './helpers'

const DAY = 86_400_000

interface Entry {
  action: string
  actorEmail: string | null
  targetType: string | null
  targetId: string | null
  at: string
  details: Record<string, unknown>
}

describe('staff administration', () => {
  const clock = fixedClock(new Date('2026-11-10T10:00:00Z'))
  let t: TestApp
  let admin: Agent
  let adminId: number
  beforeAll(async () => {
    t = await buildApp({ clock })
    admin = await signInAs(t.app, 'admin')
    adminId = (await admin.get('/api/auth/me')).body.user.id
  })
  afterAll(() => t.close())

  it('invites a colleague: the account waits as invited and a set-password link is mailed', async () => {
    const email = uniqueEmail('newcomer')

    const res = await admin
      .post('/api/staff')
      .send({ email, name: 'Idris Pemberton', role: 'developer' })
    await t.settle()

    expect(res.status).toBe(201)
    expect(res.body.user).toMatchObject({ email, role: 'developer', status: 'invited' })
    const mail = lastMailTo(t.mailer, email)
    expect(mail.subject).toMatch(/invited/i)
    expect(mail.text).toContain('Idris Pemberton')
    expect(mail.text).toMatch(/\/set-password#token=/)
    expect(mail.html).toMatch(/\/set-password#token=/)
    const signInBeforeAccepting = await request(t.app)
      .post('/api/auth/login')
      .send({ email, password: 'anything-at-all' })
    expect(signInBeforeAccepting.status).toBe(401)
  })

  it('activates the account when the invitee chooses a password', async () => {
    const email = uniqueEmail('accepting')
    const { body } = await admin
      .post('/api/staff')
      .send({ email, name: 'Juno Ashcombe', role: 'analyst' })
    await t.settle()
    const token = linkToken(lastMailTo(t.mailer, email))

    const link = await request(t.app).post('/api/auth/link').send({ token })
    const accepted = await request(t.app)
      .post('/api/auth/set-password')
      .send({ token, password: 'chosen-by-juno' })
    const list = await admin.get('/api/staff')

    expect(link.body).toEqual({ email, name: 'Juno Ashcombe', purpose: 'invite' })
    expect(accepted.status).toBe(200)
    expect(accepted.body.user).toMatchObject({ email, role: 'analyst' })
    const row = list.body.users.find((u: { id: number }) => u.id === body.user.id)
    expect(row.status).toBe('active')
    await signIn(t.app, email, 'chosen-by-juno')
  })

  it('refuses a second account with the same e-mail, whatever its case, with 409', async () => {
    const res = await admin
      .post('/api/staff')
      .send({ email: DEMO.analyst.toUpperCase(), name: 'Copy Cat', role: 'analyst' })

    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('conflict')
    expect(res.body.error.fields.email).toBeDefined()
  })

  it('refuses an invite with a bad e-mail or a role that is not staff', async () => {
    const res = await admin
      .post('/api/staff')
      .send({ email: 'not-an-email', name: '', role: 'player' })

    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'name', 'role'])
  })

  it('resends an invite, voiding the earlier link; an active account gets 409', async () => {
    const email = uniqueEmail('slow-reader')
    const { body } = await admin
      .post('/api/staff')
      .send({ email, name: 'Perrin Holloway', role: 'developer' })
    await t.settle()
    const first = linkToken(lastMailTo(t.mailer, email))

    const resent = await admin.post(`/api/staff/${body.user.id}/resend-invite`)
    await t.settle()
    const second = linkToken(lastMailTo(t.mailer, email))
    const oldLink = await request(t.app).post('/api/auth/link').send({ token: first })
    const forActive = await admin.post(`/api/staff/${adminId}/resend-invite`)

    expect(resent.status).toBe(204)
    expect(second).not.toBe(first)
    expect(oldLink.body.error.code).toBe('invalid_token')
    expect(forActive.status).toBe(409)
  })

  it("changes a colleague's role, ending their open sessions", async () => {
    const dev = await createStaff(t, admin, 'developer')

    const res = await admin.patch(`/api/staff/${dev.id}`).send({ role: 'analyst' })
    const oldSession = await whoIs(dev.agent)
    const fresh = await signIn(t.app, dev.email, dev.password)
    const me = await fresh.get('/api/auth/me')

    expect(res.status).toBe(200)
    expect(res.body.user.role).toBe('analyst')
    expect(oldSession).toBeNull()
    expect(me.body.user.role).toBe('analyst')
    expect((await fresh.get('/api/panel/players')).status).toBe(403)
  })

  it('deactivates a colleague and can bring them back', async () => {
    const analyst = await createStaff(t, admin, 'analyst')

    const off = await admin.patch(`/api/staff/${analyst.id}`).send({ status: 'deactivated' })
    const on = await admin.patch(`/api/staff/${analyst.id}`).send({ status: 'active' })

    expect(off.body.user.status).toBe('deactivated')
    expect(on.body.user.status).toBe('active')
    await signIn(t.app, analyst.email, analyst.password)
  })

  it('will not let an admin deactivate their own account or change their own role', async () => {
    const deactivate = await admin.patch(`/api/staff/${adminId}`).send({ status: 'deactivated' })
    const demote = await admin.patch(`/api/staff/${adminId}`).send({ role: 'developer' })

    expect(deactivate.status).toBe(409)
    expect(demote.status).toBe(409)
    expect((await admin.get('/api/auth/me')).body.user.role).toBe('admin')
  })

  it('refuses an empty change and unknown fields with 422', async () => {
    const empty = await admin.patch(`/api/staff/${adminId}`).send({})
    const unknown = await admin.patch(`/api/staff/${adminId}`).send({ password_hash: 'x' })

    expect(empty.status).toBe(422)
    expect(unknown.status).toBe(422)
    expect(unknown.body.error.fields.password_hash).toEqual(['Unknown field'])
  })

  it('answers 404 for an account that does not exist', async () => {
    const res = await admin.patch('/api/staff/999999').send({ name: 'Nobody' })

    expect(res.status).toBe(404)
  })

  it('lets one admin demote another while a second active admin remains', async () => {
    const other = await createStaff(t, admin, 'admin')

    const res = await admin.patch(`/api/staff/${other.id}`).send({ role: 'developer' })

    expect(res.status).toBe(200)
    expect(res.body.user.role).toBe('developer')
  })

  it('records every admin change in the audit log with who did it', async () => {
    const email = uniqueEmail('audited')
    const { body } = await admin
      .post('/api/staff')
      .send({ email, name: 'Vesna Corrigan', role: 'developer' })
    const id = body.user.id
    await admin.post(`/api/staff/${id}/resend-invite`)
    await admin.patch(`/api/staff/${id}`).send({ role: 'analyst' })
    await admin.patch(`/api/staff/${id}`).send({ status: 'deactivated' })

    const res = await admin.get('/api/audit').query({ action: 'staff.' })

    const mine: Entry[] = res.body.entries.filter((e: Entry) => e.targetId === String(id))
    expect(mine.map((e) => e.action)).toEqual([
      'staff.deactivated',
      'staff.updated',
      'staff.invite_resent',
      'staff.invited',
    ])
    expect(mine.every((e) => e.actorEmail === DEMO.admin)).toBe(true)
    expect(mine[1].details.changes).toEqual({ role: { from: 'developer', to: 'analyst' } })
  })
})

describe('the last active admin', () => {
  it('cannot be demoted or deactivated, even by a system action', async () => {
    const t = await buildApp()
    const { ctx } = t.app.locals
    const admin = await t.knex('users').where({ email: DEMO.admin }).first()
    const system = { userId: null, email: 'maintenance@example.test' }

    const demote = updateStaff(ctx, admin.id, { role: 'developer' }, system)
    const deactivate = updateStaff(ctx, admin.id, { status: 'deactivated' }, system)

    await expect(demote).rejects.toMatchObject({ code: 'conflict' })
    await expect(deactivate).rejects.toMatchObject({ code: 'conflict' })
    const after = await t.knex('users').where({ id: admin.id }).first()
    expect(after).toMatchObject({ role: 'admin', status: 'active' })
    await t.close()
  })
})

describe('the audit log', () => {
  const clock = fixedClock(new Date('2026-12-01T12:00:00Z'))
  let t: TestApp
  let admin: Agent
  let second: { email: string; agent: Agent }
  beforeAll(async () => {
    t = await buildApp({ clock })
    admin = await signInAs(t.app, 'admin')
    const other = await createStaff(t, admin, 'admin')
    second = { email: other.email, agent: other.agent }
    // Two days later the second admin invites someone, so dates and actors differ.
    clock.advance(2 * DAY)
    admin = await signInAs(t.app, 'admin')
    second.agent = await signIn(t.app, other.email, other.password)
    await second.agent
      .post('/api/staff')
      .send({ email: 'late.invitee@example.test', name: 'Tamsin Voss', role: 'analyst' })
  })
  afterAll(() => t.close())

  const entries = async (query: Record<string, string>): Promise<Entry[]> => {
    const res = await admin.get('/api/audit').query(query)
    expect(res.status).toBe(200)
    return res.body.entries
  }

  it('filters by action prefix', async () => {
    const found = await entries({ action: 'staff.invited' })

    expect(found.length).toBe(2)
    expect(found.every((e) => e.action === 'staff.invited')).toBe(true)
  })

  it('filters by actor', async () => {
    const found = await entries({ actor: second.email, action: 'staff.' })

    expect(found.map((e) => e.details.role)).toEqual(['analyst'])
  })

  it('searches details and action names with q', async () => {
    const byDetail = await entries({ q: 'analyst' })
    const byAction = await entries({ q: 'invite' })

    expect(byDetail.map((e) => e.action)).toEqual(['staff.invited'])
    expect(byAction.length).toBe(2)
  })

  it('filters by date range, both ends inclusive', async () => {
    const first = await entries({ from: '2026-12-01', to: '2026-12-01', action: 'staff.' })
    const later = await entries({ from: '2026-12-03', action: 'staff.' })
    const none = await entries({ to: '2026-11-30' })

    expect(first.map((e) => e.at.slice(0, 10))).toEqual(['2026-12-01'])
    expect(later.map((e) => e.details.role)).toEqual(['analyst'])
    expect(none).toEqual([])
  })

  it('pages with limit and offset and names the actions that exist', async () => {
    const all = await admin.get('/api/audit')
    const page = await admin.get('/api/audit').query({ limit: 1, offset: 1 })

    expect(page.body.total).toBe(all.body.total)
    expect(page.body.entries).toEqual([all.body.entries[1]])
    expect(all.body.actions).toEqual(expect.arrayContaining(['auth.sign_in', 'staff.invited']))
  })

  it('names the account by its id, never copying an address into the details', async () => {
    await admin.post('/api/auth/forgot').send({ email: 'nobody.here@example.test' })
    const [invited] = await entries({ action: 'staff.invited', actor: second.email })
    expect(invited.targetType).toBe('user')
    expect(invited.targetId).toMatch(/^\d+$/)
    const all = (await admin.get('/api/audit').query({ limit: 200 })).body.entries as Entry[]
    for (const e of all) expect(JSON.stringify(e.details), e.action).not.toMatch(/@/)
  })

  it('refuses a date that is not a date', async () => {
    const res = await admin.get('/api/audit').query({ from: '2026-02-30' })

    expect(res.status).toBe(422)
    expect(res.body.error.fields.from).toBeDefined()
  })
})
