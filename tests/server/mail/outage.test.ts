import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fixedClock } from '../../../server/clock'
import { retryWaitMs } from '../../../server/mail/retryRule'
import { buildApp, signInAs, uniqueEmail, type Agent, type TestApp } from '../helpers'
import { addPlayers } from '../sessionFixtures'
import {
  PRODUCTION_MAIL,
  emailsOf,
  openSession,
  recordingMailer,
  type RecordingMailer,
} from './fixtures'

// A mail server down for three hours, far longer than the six tries (about 15 minutes) after
// which the outbox used to give up. The outbox is driven the way server/index.ts drives it: a
// delivery run on every tick of the poll timer (here one a minute of the test clock).

const MINUTE = 60_000
const HOUR = 60 * MINUTE

interface OutboxRowSeen {
  id: number
  to: string
  status: string
  attempts: number
  message_id: string
  next_attempt_at: string | null
  last_error: string | null
}

describe('a session’s mail during a mail server outage longer than the old six tries', () => {
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  const mailer: RecordingMailer = recordingMailer()
  let t: TestApp
  let developer: Agent
  let admin: Agent
  let sessionId: number
  let emails: string[]
  let staffEmail: string
  let invited: { body: Record<string, unknown> }

  const tick = async (times: number) => {
    for (let i = 0; i < times; i++) {
      clock.advance(MINUTE)
      await t.app.locals.ctx.outbox.deliverDue()
    }
  }
  const rows = async (to: string[]): Promise<OutboxRowSeen[]> =>
    t.knex('outbox').whereIn('to', to).orderBy('id')

  beforeAll(async () => {
    t = await buildApp({ clock, mailer, config: { mail: PRODUCTION_MAIL } })
    developer = await signInAs(t.app, 'developer')
    admin = await signInAs(t.app, 'admin')
    mailer.failing = true
    sessionId = (await openSession(t, developer)).id
    const players = await addPlayers(t.knex, 4)
    emails = await emailsOf(t.knex, players)
    invited = await developer
      .post(`/api/sessions/${sessionId}/invitations`)
      .send({ playerIds: players })
    staffEmail = uniqueEmail('colleague')
    await admin
      .post('/api/staff')
      .send({ email: staffEmail, name: 'Wren Halloway', role: 'analyst' })
    await t.settle()
    await tick(3 * 60)
    // Sign-ins last 30 minutes of the test clock; staff come back to look.
    developer = await signInAs(t.app, 'developer')
    admin = await signInAs(t.app, 'admin')
  })
  afterAll(() => t.close())

  it('says the invitations were queued, not sent', () => {
    expect(invited.body).toEqual({ created: 4, existing: 0, mailsQueued: 4 })
  })

  it('keeps every invitation waiting, tried more often than the old rule allowed, none failed', async () => {
    const waiting = await rows(emails)

    expect(waiting.map((r) => r.status)).toEqual(['pending', 'pending', 'pending', 'pending'])
    for (const r of waiting) expect(r.attempts).toBeGreaterThan(PRODUCTION_MAIL.maxAttempts)
    // The pause is capped: no mail waits longer than retryMaxMs for its next try.
    for (const r of waiting)
      expect(Date.parse(r.next_attempt_at!) - clock.now().getTime()).toBeLessThanOrEqual(
        PRODUCTION_MAIL.retryMaxMs,
      )
    expect(mailer.sent).toEqual([])
  })

  it('shows staff each invitation as waiting for the mail server, with the last problem and next try', async () => {
    const res = await developer.get(`/api/sessions/${sessionId}/invitations`)
    const outbox = await admin.get('/api/mail/outbox')
    const sessionMail = outbox.body.mails.filter((m: { to: string }) => emails.includes(m.to))

    expect(res.status).toBe(200)
    for (const inv of res.body.invitations) {
      expect(inv.mail).toMatchObject({ kind: 'invitation', state: 'waiting', sentAt: null })
      expect(inv.mail.lastError).toMatch(/ECONNREFUSED/)
      expect(Date.parse(inv.mail.nextTryAt)).toBeGreaterThan(clock.now().getTime())
    }
    expect(sessionMail).toHaveLength(4)
    for (const m of sessionMail)
      expect(m).toMatchObject({ status: 'pending', sessionId, maxAttempts: null })
  })

  it('still gives up on mail of no session after maxAttempts, and shows it failed', async () => {
    const [staff] = await rows([staffEmail])
    const listed = await admin.get('/api/mail/outbox').query({ status: 'failed' })

    expect(staff).toMatchObject({ status: 'failed', attempts: PRODUCTION_MAIL.maxAttempts })
    expect(staff.last_error).toMatch(/ECONNREFUSED/)
    expect(listed.body.mails.find((m: { to: string }) => m.to === staffEmail)).toMatchObject({
      maxAttempts: PRODUCTION_MAIL.maxAttempts,
      sessionId: null,
    })
  })

  it('delivers every invitation once when the mail server is back', async () => {
    const before = await rows(emails)
    mailer.failing = false
    // Within one capped pause every waiting mail is due again.
    await tick(PRODUCTION_MAIL.retryMaxMs / MINUTE + 1)
    const after = await rows(emails)
    const delivered = mailer.sent.filter((m) => emails.includes(m.to))

    expect(after.map((r) => r.status)).toEqual(['sent', 'sent', 'sent', 'sent'])
    expect(delivered.map((m) => m.to).sort()).toEqual([...emails].sort())
    // Each with the Message-ID it was queued with.
    expect(delivered.map((m) => m.messageId).sort()).toEqual(before.map((r) => r.message_id).sort())
    const res = await (
      await signInAs(t.app, 'developer')
    ).get(`/api/sessions/${sessionId}/invitations`)
    for (const inv of res.body.invitations)
      expect(inv.mail).toMatchObject({ state: 'sent', lastError: null, nextTryAt: null })
    // The staff mail stays failed until staff retry it: it is not sent behind their backs.
    expect(mailer.sent.filter((m) => m.to === staffEmail)).toEqual([])
  })
})

describe('the wait between tries', () => {
  it('doubles from retryBaseMs and stops growing at retryMaxMs', () => {
    // Worked by hand from the rule (30 s doubling, capped at 15 min): 30, 60, 120, 240, 480,
    // 960 → 900, and 900 from then on, however many tries have failed.
    const seconds = [1, 2, 3, 4, 5, 6, 7, 50, 5000].map(
      (n) => retryWaitMs(n, PRODUCTION_MAIL.retryBaseMs, PRODUCTION_MAIL.retryMaxMs) / 1000,
    )

    expect(seconds).toEqual([30, 60, 120, 240, 480, 900, 900, 900, 900])
  })

  it('is tried again at most one capped pause after an outage ends (hours, not never)', () => {
    const worst = retryWaitMs(1e6, PRODUCTION_MAIL.retryBaseMs, PRODUCTION_MAIL.retryMaxMs)

    expect(worst).toBe(PRODUCTION_MAIL.retryMaxMs)
    expect(worst).toBeLessThan(HOUR)
  })
})
