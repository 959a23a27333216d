import { describe, expect, it } from 'vitest'
import { fixedClock } from '../../../server/clock'
import { buildApp, signInAs } from '../helpers'
import { addPlayers } from '../sessionFixtures'
import { emailsOf, openSession, recordingMailer } from './fixtures'

// A session's mail waits for as long as the session is open. When the session ends first, the
// mail that never went ends as failed, with a reason staff can read, and never goes later.

async function outageWithInvitations(days = 10) {
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  const mailer = recordingMailer()
  const t = await buildApp({ clock, mailer })
  const developer = await signInAs(t.app, 'developer')
  const admin = await signInAs(t.app, 'admin')
  const { id } = await openSession(t, developer, days)
  const players = await addPlayers(t.knex, 2)
  const emails = await emailsOf(t.knex, players)
  mailer.failing = true
  await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: players })
  await t.settle()
  const run = () => t.app.locals.ctx.outbox.deliverDue()
  const rows = () => t.knex('outbox').whereIn('to', emails).orderBy('id')
  return { t, clock, mailer, developer, admin, id, emails, run, rows }
}

describe('mail of a session that closes during an outage', () => {
  it('ends as failed with the reason, shows so to staff, and is never sent later', async () => {
    const { t, clock, mailer, developer, admin, id, emails, run, rows } =
      await outageWithInvitations()
    await run()

    const closed = await developer.post(`/api/sessions/${id}/close`)
    await run()
    const ended = await rows()
    const tracking = await developer.get(`/api/sessions/${id}/invitations`)
    const retry = await admin.post(`/api/mail/outbox/${ended[0].id}/retry`)
    mailer.failing = false
    clock.advance(t.config.mail.retryMaxMs)
    await run()

    expect(closed.status).toBe(200)
    expect(ended.map((r) => r.status)).toEqual(['failed', 'failed'])
    // The wording asked for in the brief, written out here rather than imported.
    for (const r of ended)
      expect(r.last_error).toBe('The session closed before the mail server took this mail')
    for (const inv of tracking.body.invitations)
      expect(inv.mail).toMatchObject({
        state: 'failed',
        lastError: 'The session closed before the mail server took this mail',
        nextTryAt: null,
      })
    expect(retry.status).toBe(409)
    expect(mailer.sent.filter((m) => emails.includes(m.to))).toEqual([])
    expect((await rows()).map((r) => r.status)).toEqual(['failed', 'failed'])
    await t.close()
  })

  it('ends as failed when the deadline day is over first', async () => {
    const { t, clock, mailer, emails, run, rows } = await outageWithInvitations(0)
    await run()

    // The deadline is today; its day ends at midnight UTC (server/auth/invitationTokens.ts).
    clock.advance(15 * 3_600_000)
    mailer.failing = false
    await run()
    const ended = await rows()

    expect(ended.map((r) => r.status)).toEqual(['failed', 'failed'])
    expect(ended[0].last_error).toMatch(/deadline passed before the mail server took this mail/)
    expect(mailer.sent.filter((m) => emails.includes(m.to))).toEqual([])
    await t.close()
  })

  it('goes out when the session is still open, however long the outage lasted', async () => {
    const { t, clock, mailer, emails, run, rows } = await outageWithInvitations()
    for (let i = 0; i < 40; i++) {
      clock.advance(t.config.mail.retryMaxMs)
      await run()
    }
    const waiting = await rows()
    mailer.failing = false
    clock.advance(t.config.mail.retryMaxMs)
    await run()

    expect(waiting.map((r) => r.status)).toEqual(['pending', 'pending'])
    expect(waiting.every((r) => r.attempts > t.config.mail.maxAttempts)).toBe(true)
    expect((await rows()).map((r) => r.status)).toEqual(['sent', 'sent'])
    expect(mailer.sent.filter((m) => emails.includes(m.to))).toHaveLength(2)
    await t.close()
  })
})
