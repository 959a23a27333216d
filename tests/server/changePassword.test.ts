import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import {
  buildApp,
  cookieValue,
  createStaff,
  sessionCookie,
  signIn,
  signInAs,
  whoIs,
  type Agent,
  type TestApp,
} from './helpers'

// Changing one's own password: OWASP ASVS 4.0.3 §2.1.5 "Verify users can change their password",
// §2.1.6 "Verify that password change functionality requires the user's current and new
// password", §2.2.3 "Verify that secure notifications are sent to users after updates to
// authentication details" (all from memory).

const NEW = 'Spruce top, maple back, 1742'

let t: TestApp
let admin: Agent
beforeAll(async () => {
  t = await buildApp()
  admin = await signInAs(t.app, 'admin')
})
afterAll(() => t.close())

const change = (agent: Agent, currentPassword: string, newPassword: string) =>
  agent.post('/api/auth/password').send({ currentPassword, newPassword })

describe('changing your own password', () => {
  it('keeps this sign-in, ends every other one, and mails the owner', async () => {
    const user = await createStaff(t, admin, 'analyst')
    const login = () =>
      request(t.app).post('/api/auth/login').send({ email: user.email, password: user.password })
    const laptop = cookieValue(sessionCookie(await login())!)
    const phone = cookieValue(sessionCookie(await login())!)
    const me = (cookie: string) => request(t.app).get('/api/auth/me').set('Cookie', cookie)
    const mailsBefore = t.mailer.sent.length

    const res = await request(t.app)
      .post('/api/auth/password')
      .set('Cookie', laptop)
      .send({ currentPassword: user.password, newPassword: NEW })
    await t.settle()

    expect(res.status).toBe(200)
    expect(res.body.user.email).toBe(user.email)
    const renewed = cookieValue(sessionCookie(res)!)
    expect((await me(renewed)).body.user.email).toBe(user.email)
    // The cookie from before the change, wherever a copy of it is, no longer works.
    expect((await me(laptop)).body.user).toBeNull()
    expect((await me(phone)).body.user).toBeNull()
    expect(await whoIs(user.agent)).toBeNull()

    const mails = t.mailer.sent.slice(mailsBefore)
    expect(mails.map((m) => [m.to, m.subject])).toEqual([
      [user.email, 'Your Ringdown password was changed'],
    ])
    expect(mails[0].text).not.toContain(NEW)
    expect(mails[0].text).toContain('http://localhost:3000/forgot-password')

    const oldOne = await request(t.app)
      .post('/api/auth/login')
      .send({ email: user.email, password: user.password })
    expect(oldOne.status).toBe(401)
    await signIn(t.app, user.email, NEW)
    const audit = await t.knex('audit_log').where({ action: 'auth.password_changed' })
    expect(audit.map((a) => a.target_id)).toEqual([String(user.id)])
    expect(JSON.stringify(audit)).not.toContain(NEW)
  })

  it('refuses a wrong current password at its field and changes nothing', async () => {
    const user = await createStaff(t, admin, 'developer')

    const res = await change(user.agent, 'not-my-password', NEW)

    expect(res.status).toBe(422)
    expect(res.body.error.fields).toEqual({
      currentPassword: ['This is not your current password'],
    })
    expect(await whoIs(user.agent)).toBe(user.email)
    await signIn(t.app, user.email, user.password)
  })

  it.each([
    ['too common', '1234567890', /^Too common\./],
    ['too short', 'short one', /^Too short: use at least 10 characters/],
    ['only spaces', ' '.repeat(12), /^Only spaces/],
    ['longer than 72 bytes', `${'violin bow '.repeat(7)}rosin`, /^Longer than 72 bytes/],
    ['the owner’s name', 'Orla Testington plays viola', /Contains your name/],
    ['the current password', 'a-long-enough-password', /same as your current password/],
  ])('refuses a new password that is %s, at newPassword', async (_label, password, reason) => {
    const user = await createStaff(t, admin, 'analyst')

    const res = await change(user.agent, user.password, password)

    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toEqual(['newPassword'])
    expect(res.body.error.fields.newPassword[0]).toMatch(reason)
    await signIn(t.app, user.email, user.password)
  })

  it('is for signed-in staff only', async () => {
    const res = await request(t.app)
      .post('/api/auth/password')
      .send({ currentPassword: 'whatever-it-is', newPassword: NEW })
    expect(res.status).toBe(401)
  })
})
