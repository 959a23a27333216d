import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import jwt from 'jsonwebtoken'
import { fixedClock } from '../../server/clock'
import {
  buildApp,
  cookieValue,
  DEMO,
  DEMO_PASSWORD,
  sessionCookie,
  whoIs,
  type TestApp,
} from './helpers'

// Sign-out ends the session on the server, not only in the browser: OWASP ASVS 4.0.3 §3.3.1
// "Verify that logout and expiration invalidate the session token, such that the back button or
// a downstream relying party does not resume an authenticated session" (from memory). A cookie
// copied before sign-out is that downstream party.

const MINUTE = 60_000

const recipe = {
  name: 'Sign-out check G',
  instrument: 'violin',
  stringName: 'G',
  core: 'synthetic multifilament',
  windings: [{ material: 'silver', profile: 'round', wireMm: 0.12 }],
  dampingKind: 'compound',
  dampingGrade: 'V-40',
  gaugeMm: 0.8,
  tensionN: 45,
  vibratingLengthMm: 328,
}

const clock = fixedClock(new Date('2026-11-04T09:00:00Z'))
let t: TestApp
beforeAll(async () => {
  t = await buildApp({ clock })
})
afterAll(() => t.close())

/** Signs in without an agent and returns the cookie as a browser would keep it. */
async function cookieOf(email: string): Promise<string> {
  const res = await request(t.app).post('/api/auth/login').send({ email, password: DEMO_PASSWORD })
  expect(res.status).toBe(200)
  return cookieValue(sessionCookie(res)!)
}

const claimsOf = (cookie: string) =>
  JSON.parse(Buffer.from(cookie.split('=')[1].split('.')[1], 'base64url').toString()) as Record<
    string,
    unknown
  >

const me = (cookie: string) => request(t.app).get('/api/auth/me').set('Cookie', cookie)

describe('signing out', () => {
  it('ends the session on the server: a cookie kept from before reads and writes nothing', async () => {
    const kept = await cookieOf(DEMO.developer)
    expect((await me(kept)).body.user.email).toBe(DEMO.developer)

    const out = await request(t.app).post('/api/auth/logout').set('Cookie', kept)
    const read = await me(kept)
    const write = await request(t.app).post('/api/recipes').set('Cookie', kept).send(recipe)

    expect(out.status).toBe(204)
    expect(read.body.user).toBeNull()
    expect(write.status).toBe(401)
    expect(await t.knex('recipes').where({ name: recipe.name }).first()).toBeUndefined()
  })

  it('ends only that sign-in: the same account on another device stays signed in', async () => {
    const laptop = await cookieOf(DEMO.analyst)
    const phone = await cookieOf(DEMO.analyst)

    await request(t.app).post('/api/auth/logout').set('Cookie', laptop)

    expect((await me(laptop)).body.user).toBeNull()
    expect((await me(phone)).body.user.email).toBe(DEMO.analyst)
  })

  it('keeps one record through a renewal, so signing out ends the renewed and the old cookie', async () => {
    const first = await cookieOf(DEMO.admin)
    clock.advance((t.config.sessionMinutes / 2) * MINUTE + MINUTE)
    const renewedRes = await me(first)
    const renewed = cookieValue(sessionCookie(renewedRes)!)

    expect(claimsOf(renewed).sid).toBe(claimsOf(first).sid)
    const row = await t
      .knex('staff_sign_ins')
      .where({ id: claimsOf(first).sid })
      .first()
    expect(Date.parse(row.expires_at)).toBe(
      clock.now().getTime() + t.config.sessionMinutes * MINUTE,
    )

    await request(t.app).post('/api/auth/logout').set('Cookie', renewed)
    expect((await me(renewed)).body.user).toBeNull()
    expect((await me(first)).body.user).toBeNull()
  })

  it('prunes sign-ins that have run out', async () => {
    const old = await cookieOf(DEMO.developer)
    clock.advance((t.config.sessionMinutes + 1) * MINUTE)
    await cookieOf(DEMO.developer)

    expect(
      await t
        .knex('staff_sign_ins')
        .where({ id: claimsOf(old).sid })
        .first(),
    ).toBeUndefined()
  })
})

describe('a session token', () => {
  // Signed with the app's own secret, so only the claims decide (RFC 7519 §4.1.4 exp, §4.1.6 iat).
  // jsonwebtoken adds an iat of its own unless told not to, and then drops the one given.
  const forge = (claims: Record<string, unknown>) =>
    `rd_session=${jwt.sign(claims, t.config.jwtSecret, { algorithm: 'HS256', noTimestamp: !('iat' in claims) })}`

  it('is refused without exp, without iat, or with a lifetime beyond the configured one', async () => {
    const good = claimsOf(await cookieOf(DEMO.admin))
    const now = Math.floor(clock.now().getTime() / 1000)
    const { exp: _exp, iat: _iat, ...rest } = good
    const lifetime = t.config.sessionMinutes * 60

    const fine = await me(forge({ ...rest, iat: now, exp: now + lifetime }))
    const noExp = await me(forge({ ...rest, iat: now }))
    const noIat = await me(forge({ ...rest, exp: now + lifetime }))
    const tooLong = await me(forge({ ...rest, iat: now, exp: now + lifetime + 60 }))
    const yearLong = await me(forge({ ...rest, iat: now, exp: now + 365 * 24 * 3600 }))

    expect(fine.body.user?.email).toBe(DEMO.admin)
    for (const res of [noExp, noIat, tooLong, yearLong]) {
      expect(res.body.user).toBeNull()
      expect(sessionCookie(res)).toMatch(/^rd_session=;/)
    }
  })

  it('is refused when it names no sign-in record or one that never existed', async () => {
    const good = claimsOf(await cookieOf(DEMO.admin))
    const { sid: _sid, ...withoutSid } = good

    expect((await me(forge(withoutSid))).body.user).toBeNull()
    expect((await me(forge({ ...good, sid: 'not-a-sign-in-of-ours' }))).body.user).toBeNull()
  })

  it('still works for an agent that signs in, out and in again', async () => {
    const agent = request.agent(t.app)
    await agent.post('/api/auth/login').send({ email: DEMO.admin, password: DEMO_PASSWORD })
    await agent.post('/api/auth/logout')
    await agent.post('/api/auth/login').send({ email: DEMO.admin, password: DEMO_PASSWORD })
    expect(await whoIs(agent)).toBe(DEMO.admin)
  })
})
