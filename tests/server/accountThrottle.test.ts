import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { fixedClock } from '../../server/clock'
import { buildApp, DEMO, DEMO_PASSWORD, sessionCookie, signInAs, type TestApp } from './helpers'

// Failed sign-ins are limited per account, whichever addresses they come from: OWASP ASVS 4.0.3
// §2.2.1 "Verify that anti-automation controls are effective at mitigating breached credential
// testing, brute force, and account lockout attacks" (from memory). The limit must not tell a
// known address from an unknown one (§2.2.1 again, and the same answer rule as the sign-in).

const MINUTE = 60_000
const MAX = 5

const clock = fixedClock(new Date('2026-11-05T08:00:00Z'))
let t: TestApp
let n = 0
beforeAll(async () => {
  t = await buildApp({
    clock,
    // The per-address limit is lifted, so only the per-account one can answer 429 here.
    config: {
      accountThrottle: { windowMs: 15 * MINUTE, maxFailures: MAX },
      loginRateLimit: { windowMs: 15 * MINUTE, max: 10_000 },
    },
  })
})
afterAll(() => t.close())

/** A sign-in attempt from an address of its own, as a botnet would send them. */
const attempt = (email: string, password: string) => {
  n += 1
  return request(t.app)
    .post('/api/auth/login')
    .set('X-Forwarded-For', `198.51.100.${n % 250}`)
    .send({ email, password })
}

describe('the per-account throttle', () => {
  it('makes an account wait after too many failures from many addresses, even with the right password', async () => {
    const failures = []
    for (let i = 0; i < MAX; i++) failures.push((await attempt(DEMO.analyst, `guess-${i}`)).status)
    const right = await attempt(DEMO.analyst, DEMO_PASSWORD)

    expect(failures).toEqual(Array(MAX).fill(401))
    expect(right.status).toBe(429)
    expect(right.body.error.code).toBe('rate_limited')
    expect(right.body.error.message).toMatch(/Wait 15 minutes/)
    expect(sessionCookie(right)).toBeUndefined()
  })

  it('answers an unknown address exactly as a known one, wait and all', async () => {
    const known = DEMO.developer
    const unknown = 'no.such.person@example.test'
    for (let i = 0; i < MAX; i++) {
      const [a, b] = [await attempt(known, `try-${i}`), await attempt(unknown, `try-${i}`)]
      expect(b.status).toBe(a.status)
      expect(b.body).toEqual(a.body)
    }
    const [a, b] = [await attempt(known, 'again'), await attempt(unknown, 'again')]

    expect(a.status).toBe(429)
    expect(b.status).toBe(429)
    expect(b.body).toEqual(a.body)
  })

  it('does not hold back the other accounts, even from the same address', async () => {
    const office = (email: string, password: string) =>
      request(t.app)
        .post('/api/auth/login')
        .set('X-Forwarded-For', '203.0.113.7')
        .send({ email, password })
    const waiting = 'waits@example.test'
    for (let i = 0; i < MAX + 3; i++) await office(waiting, `wrong-${i}`)

    expect((await office(waiting, 'wrong-again')).status).toBe(429)
    expect((await office(DEMO.admin, DEMO_PASSWORD)).status).toBe(200)
  })

  it('lets the account in again once the failures have left the window', async () => {
    clock.advance(15 * MINUTE + 1000)
    const right = await attempt(DEMO.analyst, DEMO_PASSWORD)
    expect(right.status).toBe(200)
  })

  it('counts a wrong current password on the change-password form as a failure', async () => {
    const developer = await signInAs(t.app, 'developer')
    for (let i = 0; i < MAX; i++) {
      const res = await developer
        .post('/api/auth/password')
        .send({ currentPassword: `not-it-${i}`, newPassword: 'Amber rosin on a winter bridge 7' })
      expect(res.status).toBe(422)
    }
    const blocked = await attempt(DEMO.developer, DEMO_PASSWORD)
    const change = await developer
      .post('/api/auth/password')
      .send({ currentPassword: DEMO_PASSWORD, newPassword: 'Amber rosin on a winter bridge 7' })

    expect(blocked.status).toBe(429)
    expect(change.status).toBe(429)
  })
})

describe('the per-address limit', () => {
  it('still counts only failures, so an office signing in all day is never locked out', async () => {
    const local = await buildApp({ config: { loginRateLimit: { windowMs: 60_000, max: 3 } } })
    const statuses = []
    for (let i = 0; i < 10; i++)
      statuses.push(
        (
          await request(local.app)
            .post('/api/auth/login')
            .send({ email: DEMO.admin, password: DEMO_PASSWORD })
        ).status,
      )
    expect(statuses).toEqual(Array(10).fill(200))
    await local.close()
  })
})
