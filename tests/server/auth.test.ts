import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import bcrypt from 'bcryptjs'
import jwt from 'jsonwebtoken'
import { fixedClock } from '../../server/clock'
import {
  buildApp,
  cookieValue,
  createStaff,
  DEMO,
  DEMO_PASSWORD,
  sessionCookie,
  signInAs,
  whoIs,
  type TestApp,
} from './helpers'

const MINUTE = 60_000

describe('signing in', () => {
  const clock = fixedClock(new Date('2026-11-02T09:00:00Z'))
  let t: TestApp
  beforeAll(async () => {
    t = await buildApp({ clock })
  })
  afterAll(() => t.close())

  it('sets an httpOnly, SameSite=Lax session cookie and returns who signed in', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .send({ email: DEMO.developer, password: DEMO_PASSWORD })

    expect(res.status).toBe(200)
    expect(res.body.user).toMatchObject({ email: DEMO.developer, role: 'developer' })
    expect(res.body.user).not.toHaveProperty('password_hash')
    const cookie = sessionCookie(res)!
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    expect(cookie).toMatch(/Path=\//)
  })

  it('accepts the e-mail in any case and with surrounding spaces', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .send({ email: '  Analyst@Ringdown.TEST ', password: DEMO_PASSWORD })

    expect(res.status).toBe(200)
  })

  it('rejects a wrong password with the same answer as an unknown e-mail', async () => {
    const wrongPassword = await request(t.app)
      .post('/api/auth/login')
      .send({ email: DEMO.admin, password: 'not-the-password' })
    const unknownEmail = await request(t.app)
      .post('/api/auth/login')
      .send({ email: 'nobody@ringdown.test', password: 'not-the-password' })

    expect(wrongPassword.status).toBe(401)
    expect(unknownEmail.status).toBe(wrongPassword.status)
    expect(unknownEmail.body).toEqual(wrongPassword.body)
    expect(wrongPassword.body.error.code).toBe('unauthenticated')
    expect(sessionCookie(wrongPassword)).toBeUndefined()
  })

  it('refuses a sign-in body with missing or unknown fields with 422', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .send({ email: 'not-an-email', role: 'admin' })

    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'password', 'role'])
    expect(res.body.error.fields.role).toEqual(['Unknown field'])
  })

  it('tells a signed-in user who they are, and an anonymous caller that nobody is', async () => {
    const analyst = await signInAs(t.app, 'analyst')

    const me = await analyst.get('/api/auth/me')
    const anonymous = await request(t.app).get('/api/auth/me')

    expect(me.status).toBe(200)
    expect(me.body.user).toEqual({
      id: expect.any(Number),
      email: DEMO.analyst,
      name: expect.any(String),
      role: 'analyst',
    })
    expect(me.body.features).toEqual({ mailbox: false })
    expect(anonymous.status).toBe(200)
    expect(anonymous.body.user).toBeNull()
  })

  it('signs out by clearing the cookie, after which the session is gone', async () => {
    const admin = await signInAs(t.app, 'admin')

    const out = await admin.post('/api/auth/logout')

    expect(out.status).toBe(204)
    expect(sessionCookie(out)).toMatch(/^rd_session=;.*Expires=Thu, 01 Jan 1970/i)
    expect(await whoIs(admin)).toBeNull()
    expect((await admin.get('/api/panel/summary')).status).toBe(401)
  })

  it('refuses a tampered cookie and one signed with another secret', async () => {
    const login = await request(t.app)
      .post('/api/auth/login')
      .send({ email: DEMO.admin, password: DEMO_PASSWORD })
    const [name, token] = cookieValue(sessionCookie(login)!).split('=')
    const [head, body, sig] = token.split('.')
    const claims = JSON.parse(Buffer.from(body, 'base64url').toString())
    const promoted = Buffer.from(JSON.stringify({ ...claims, sub: claims.sub + 1 })).toString(
      'base64url',
    )
    const forged = jwt.sign({ sub: claims.sub, tv: claims.tv }, 'some-other-secret', {
      audience: 'session',
      expiresIn: 600,
    })

    for (const bad of [
      `${head}.${promoted}.${sig}`,
      `${head}.${body}.${sig.slice(0, -2)}xx`,
      forged,
    ]) {
      const res = await request(t.app).get('/api/panel/summary').set('Cookie', `${name}=${bad}`)
      expect(res.status).toBe(401)
      expect(sessionCookie(res)).toMatch(/^rd_session=;/)
    }
  })

  it('refuses a cookie once its lifetime has passed', async () => {
    const admin = await signInAs(t.app, 'admin')

    clock.advance((t.config.sessionMinutes + 1) * MINUTE)
    const res = await admin.get('/api/panel/summary')

    expect(res.status).toBe(401)
    expect(await whoIs(admin)).toBeNull()
  })

  it('renews the cookie after half its lifetime, so an active user stays signed in', async () => {
    const admin = await signInAs(t.app, 'admin')
    const half = (t.config.sessionMinutes / 2) * MINUTE

    const early = await admin.get('/api/panel/summary')
    clock.advance(half + MINUTE)
    const late = await admin.get('/api/panel/summary')
    clock.advance(half + MINUTE)
    const afterFirstExpiry = await admin.get('/api/panel/summary')

    expect(sessionCookie(early)).toBeUndefined()
    expect(late.status).toBe(200)
    expect(sessionCookie(late)).toMatch(/^rd_session=[^;]+;/)
    expect(afterFirstExpiry.status).toBe(200)
  })

  it("ends a deactivated user's session and refuses their next sign-in", async () => {
    const admin = await signInAs(t.app, 'admin')
    const dev = await createStaff(t, admin, 'developer')
    expect(await whoIs(dev.agent)).toBe(dev.email)

    const off = await admin.patch(`/api/staff/${dev.id}`).send({ status: 'deactivated' })
    const me = await dev.agent.get('/api/panel/summary')
    const again = await request(t.app)
      .post('/api/auth/login')
      .send({ email: dev.email, password: dev.password })
    const wrong = await request(t.app)
      .post('/api/auth/login')
      .send({ email: dev.email, password: 'not-the-password' })

    expect(off.status).toBe(200)
    expect(me.status).toBe(401)
    expect(again.status).toBe(401)
    expect(again.body).toEqual(wrong.body)
  })

  it('records sign-ins and failed sign-ins in the audit log', async () => {
    await request(t.app)
      .post('/api/auth/login')
      .send({ email: 'ghost@ringdown.test', password: 'whatever-it-is' })
    const admin = await signInAs(t.app, 'admin')

    const res = await admin.get('/api/audit').query({ action: 'auth.sign_in' })

    const actions = res.body.entries.map((e: { action: string }) => e.action)
    expect(actions).toContain('auth.sign_in')
    expect(actions).toContain('auth.sign_in_failed')
    const failed = res.body.entries.find(
      (e: { actorEmail: string }) => e.actorEmail === 'ghost@ringdown.test',
    )
    expect(failed.details).toEqual({ reason: 'wrong credentials' })
    expect(JSON.stringify(res.body)).not.toContain('whatever-it-is')
  })
})

describe('the sign-in rate limit', () => {
  it('answers 429 rate_limited after too many attempts, even with the right password', async () => {
    const t = await buildApp({ config: { loginRateLimit: { windowMs: 60_000, max: 3 } } })
    const attempt = (password: string) =>
      request(t.app).post('/api/auth/login').send({ email: DEMO.admin, password })

    const first = [await attempt('guess-one'), await attempt('guess-two'), await attempt('guess-3')]
    const blocked = await attempt(DEMO_PASSWORD)

    expect(first.map((r) => r.status)).toEqual([401, 401, 401])
    expect(blocked.status).toBe(429)
    expect(blocked.body.error.code).toBe('rate_limited')
    expect(sessionCookie(blocked)).toBeUndefined()
    await t.close()
  })
})

describe('an unknown e-mail', () => {
  it('costs about as much time as a wrong password, so addresses cannot be probed', async () => {
    // The demo accounts are hashed at cost 10; the app is configured to match.
    const t = await buildApp({ config: { bcryptCost: 10 } })
    const timed = async (email: string) => {
      const start = performance.now()
      await request(t.app).post('/api/auth/login').send({ email, password: 'not-the-password' })
      return performance.now() - start
    }
    await timed('warm-up@ringdown.test')
    const known: number[] = []
    const unknown: number[] = []
    for (let i = 0; i < 3; i++) {
      known.push(await timed(DEMO.analyst))
      unknown.push(await timed(`nobody${i}@ringdown.test`))
    }

    expect(Math.min(...unknown)).toBeGreaterThan(Math.min(...known) * 0.4)
    await t.close()
  })
})

describe('demo accounts in production', () => {
  it('are refused with the ordinary wrong-credentials answer while other accounts sign in', async () => {
    const t = await buildApp({ config: { env: 'production' } })
    const now = new Date().toISOString()
    await t.knex('users').insert({
      email: 'owner@example.test',
      name: 'Rosalind Fenwick',
      role: 'admin',
      status: 'active',
      password_hash: bcrypt.hashSync('owner-password-1', 4),
      created_at: now,
      updated_at: now,
    })
    const login = (email: string, password: string) =>
      request(t.app).post('/api/auth/login').send({ email, password })

    const demo = await login(DEMO.admin, DEMO_PASSWORD)
    const wrong = await login(DEMO.admin, 'not-the-password')
    const owner = await login('owner@example.test', 'owner-password-1')

    expect(demo.status).toBe(401)
    expect(demo.body).toEqual(wrong.body)
    expect(owner.status).toBe(200)
    expect(sessionCookie(owner)).toMatch(/Secure/)
    await t.close()
  })
})

describe('a password longer than bcrypt reads', () => {
  it('never signs in on its first 72 bytes alone', async () => {
    const t = await buildApp()
    const now = new Date().toISOString()
    const stored = 'A'.repeat(72)
    const hash = bcrypt.hashSync(stored, 4)
    // The reference: bcrypt takes at most 72 bytes of key (Provos and Mazières 1999, "A
    // Future-Adaptable Password Scheme"), so the library itself matches any longer tail.
    expect(bcrypt.compareSync(`${stored}and any tail`, hash)).toBe(true)
    await t.knex('users').insert({
      email: 'long.password@example.test',
      name: 'Tamsin Harrowgate',
      role: 'analyst',
      status: 'active',
      password_hash: hash,
      created_at: now,
      updated_at: now,
    })
    const login = (password: string) =>
      request(t.app).post('/api/auth/login').send({ email: 'long.password@example.test', password })

    const withTail = await login(`${stored}and any tail`)
    const exact = await login(stored)

    expect(withTail.status).toBe(401)
    expect(withTail.body.error.message).toBe('E-mail or password is not right')
    expect(exact.status).toBe(200)
    await t.close()
  })
})
