import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import pino from 'pino'
import { fixedClock, systemClock } from '../../server/clock'
import { createOutbox } from '../../server/mail/outbox'
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fakeSmtp'
import { smtpMailer } from '../../server/mail/transport'
import {
  buildApp,
  linkToken,
  memoryMailbox,
  signInAs,
  uniqueEmail,
  whoIs,
  type Agent,
  type TestApp,
} from './helpers'

interface MailItem {
  id: number
  to: string
  subject: string
  status: string
  attempts: number
  lastError: string | null
  sentAt: string | null
  nextAttemptAt: string | null
}

describe('the outbox while the mail server is down', () => {
  const clock = fixedClock(new Date('2026-11-20T07:30:00Z'))
  let t: TestApp
  let admin: Agent
  beforeAll(async () => {
    t = await buildApp({ clock })
    admin = await signInAs(t.app, 'admin')
  })
  afterAll(() => t.close())

  const outboxItem = async (to: string): Promise<MailItem> => {
    const res = await admin.get('/api/mail/outbox')
    expect(res.status).toBe(200)
    return res.body.mails.find((m: MailItem) => m.to === to)
  }

  // A staff invitation belongs to no session: it gets maxAttempts tries, then shows as failed.
  // (A session's mail is tried for as long as the session is open: tests/server/mail/.)
  it('keeps a mail of no session pending with back-off, marks it failed after the last attempt, and sends it on retry', async () => {
    const { retryBaseMs, maxAttempts } = t.config.mail
    t.mailer.failing = true
    const email = uniqueEmail('patient')

    await admin.post('/api/staff').send({ email, name: 'Quentin Marlowe', role: 'analyst' })
    await t.settle()
    const first = await outboxItem(email)

    expect(first).toMatchObject({ status: 'pending', attempts: 1, sentAt: null })
    expect(first.lastError).toMatch(/ECONNREFUSED/)
    expect(Date.parse(first.nextAttemptAt!)).toBe(clock.now().getTime() + retryBaseMs)

    // Not yet due: a run now must not touch it.
    await t.app.locals.ctx.outbox.deliverDue()
    expect((await outboxItem(email)).attempts).toBe(1)

    clock.advance(retryBaseMs)
    await t.app.locals.ctx.outbox.deliverDue()
    const second = await outboxItem(email)
    expect(second).toMatchObject({ status: 'pending', attempts: 2 })
    // The wait doubles after each failure.
    expect(Date.parse(second.nextAttemptAt!)).toBe(clock.now().getTime() + 2 * retryBaseMs)

    for (let attempt = 3; attempt <= maxAttempts; attempt++) {
      clock.advance(retryBaseMs * 2 ** (attempt - 2))
      await t.app.locals.ctx.outbox.deliverDue()
    }
    const failed = await outboxItem(email)
    expect(failed).toMatchObject({ status: 'failed', attempts: maxAttempts, nextAttemptAt: null })
    const listedFailed = await admin.get('/api/mail/outbox').query({ status: 'failed' })
    expect(listedFailed.body.mails.map((m: MailItem) => m.id)).toContain(failed.id)
    expect(t.mailer.sent.filter((m) => m.to === email)).toEqual([])

    t.mailer.failing = false
    const retry = await admin.post(`/api/mail/outbox/${failed.id}/retry`)
    await t.settle()
    const sent = await outboxItem(email)

    expect(retry.status).toBe(204)
    expect(sent).toMatchObject({ status: 'sent', lastError: null })
    expect(sent.sentAt).not.toBeNull()
    const delivered = t.mailer.sent.filter((m) => m.to === email)
    expect(delivered).toHaveLength(1)
    expect(delivered[0].subject).toMatch(/invited/i)
    const audit = await admin.get('/api/audit').query({ action: 'mail.retried' })
    expect(audit.body.entries[0].targetId).toBe(String(failed.id))
  })

  it('refuses to retry a mail that was already sent, or one that does not exist', async () => {
    const email = uniqueEmail('prompt')
    await admin.post('/api/staff').send({ email, name: 'Rhoswen Tate', role: 'developer' })
    await t.settle()
    const sent = await outboxItem(email)

    const again = await admin.post(`/api/mail/outbox/${sent.id}/retry`)
    const missing = await admin.post('/api/mail/outbox/999999/retry')

    expect(sent.status).toBe('sent')
    expect(again.status).toBe(404)
    expect(missing.status).toBe(404)
    expect(t.mailer.sent.filter((m) => m.to === email)).toHaveLength(1)
  })

  it('queues nothing when the change behind a mail is refused', async () => {
    const before = (await admin.get('/api/mail/outbox')).body.mails.length

    const duplicate = await admin
      .post('/api/staff')
      .send({ email: 'developer@ringdown.test', name: 'Second Copy', role: 'developer' })
    await t.settle()

    expect(duplicate.status).toBe(409)
    expect((await admin.get('/api/mail/outbox')).body.mails.length).toBe(before)
  })
})

describe('mail through a real SMTP server', () => {
  let smtp: FakeSmtp
  let t: TestApp
  let admin: Agent
  beforeAll(async () => {
    smtp = await startFakeSmtp()
    t = await buildApp({
      mailer: smtpMailer({ host: '127.0.0.1', port: smtp.port }),
      mailbox: smtp.mailbox,
    })
    admin = await signInAs(t.app, 'admin')
  })
  afterAll(async () => {
    await t.close()
    await smtp.close()
  })

  it('delivers an invitation whose parsed text and HTML carry a working set-password link', async () => {
    const email = uniqueEmail('over-the-wire')

    await admin.post('/api/staff').send({ email, name: 'Sabine Ellery', role: 'developer' })
    await t.settle()
    const res = await admin.get('/api/mail/mailbox')

    expect(res.status).toBe(200)
    const mail = res.body.mails.find((m: { to: string }) => m.to === email)
    expect(mail).toMatchObject({
      from: expect.stringContaining('no-reply@ringdown.test'),
      subject: 'You are invited to Ringdown',
    })
    expect(mail.text).toContain('Hello Sabine Ellery,')
    expect(mail.text).toMatch(/http:\/\/localhost:3000\/set-password#token=/)
    expect(mail.html).toMatch(/<a href="http:\/\/localhost:3000\/set-password#token=/)

    const agent = request.agent(t.app)
    const accepted = await agent
      .post('/api/auth/set-password')
      .send({ token: linkToken(mail), password: 'sabine-chose-this' })
    expect(accepted.status).toBe(200)
    expect(await whoIs(agent)).toBe(email)
  })

  it('tells the client that a mailbox is available', async () => {
    const me = await admin.get('/api/auth/me')

    expect(me.body.features).toEqual({ mailbox: true })
  })
})

describe('the mailbox route', () => {
  it('does not exist without a local mail fake', async () => {
    const t = await buildApp()
    const admin = await signInAs(t.app, 'admin')

    const res = await admin.get('/api/mail/mailbox')

    expect(res.status).toBe(404)
    await t.close()
  })

  it('does not exist in production even when a mailbox is given', async () => {
    const t = await buildApp({ config: { env: 'production' }, mailbox: memoryMailbox() })

    const res = await request(t.app).get('/api/mail/mailbox')

    expect(res.status).toBe(404)
    await t.close()
  })
})

describe('outbox delivery runs', () => {
  it('never send a mail twice when runs are started at the same time', async () => {
    const t = await buildApp()
    const sent: string[] = []
    const slowMailer = {
      async send(mail: { to: string }) {
        await new Promise((r) => setTimeout(r, 5))
        sent.push(mail.to)
      },
    }
    const outbox = createOutbox({
      knex: t.knex,
      mailer: slowMailer,
      clock: systemClock,
      config: t.config,
      logger: pino({ level: 'silent' }),
    })
    const mail = (to: string) => ({
      to,
      subject: 'Hello',
      text: 'Hi',
      html: '<p>Hi</p>',
      kind: 'test',
    })

    await Promise.all(
      ['a@example.test', 'b@example.test', 'c@example.test'].map((to) => outbox.enqueue(mail(to))),
    )
    await Promise.all([outbox.deliverDue(), outbox.deliverDue(), outbox.deliverDue()])
    await outbox.settle()

    expect(sent.sort()).toEqual(['a@example.test', 'b@example.test', 'c@example.test'])
    expect((await outbox.list()).map((m) => m.status)).toEqual(['sent', 'sent', 'sent'])
    await t.close()
  })
})
