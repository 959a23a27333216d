import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fixedClock, systemClock } from '../../../server/clock'
import { testConfig } from '../../../server/config'
import { createKnex } from '../../../server/db/knex'
import { prepareDatabase } from '../../../server/db/prepare'
import { startFakeSmtp, type FakeSmtp } from '../../../server/mail/fakeSmtp'
import { smtpMailer } from '../../../server/mail/transport'
import { buildApp, type TestApp } from '../helpers'
import { outboxOn, plainMail, queueMails, recordingMailer } from './fixtures'

// Each mail is claimed before it is sent, so no two runs send one row. A row a killed process
// left 'sending' goes again once its claim is older than the lease, with the Message-ID it was
// queued with; a receiving side that keeps one copy per Message-ID then holds it once.

/**
 * RFC 5322 §3.6.4: msg-id = "<" id-left "@" id-right ">", where id-left is dot-atom-text and
 * id-right is dot-atom-text or a no-fold-literal; dot-atom-text (§3.2.3) is runs of atext
 * joined by single dots, atext (§3.2.3) letters, digits and !#$%&'*+-/=?^_`{|}~.
 */
const ATEXT = "[A-Za-z0-9!#$%&'*+\\-/=?^_`{|}~]+"
const DOT_ATOM = `${ATEXT}(?:\\.${ATEXT})*`
const MSG_ID = new RegExp(`^<${DOT_ATOM}@(?:${DOT_ATOM}|\\[[\\x21-\\x5a\\x5e-\\x7e]*\\])>$`)

describe('two delivery runs at once', () => {
  let dir: string
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'ringdown-claims-'))
  })
  afterAll(() => rmSync(dir, { recursive: true, force: true }))

  it('in two processes on one database file never send a row twice', async () => {
    const file = join(dir, 'two.sqlite')
    const first = createKnex(file)
    await prepareDatabase(first)
    const second = createKnex(file)
    const config = testConfig()
    const mailerA = recordingMailer()
    const mailerB = recordingMailer()
    mailerA.delayMs = mailerB.delayMs = 3
    const a = outboxOn(first, mailerA, config, systemClock)
    const b = outboxOn(second, mailerB, config, systemClock)
    const addresses = Array.from({ length: 24 }, (_, i) => `twice.${i}@example.test`)
    await queueMails(
      first,
      a,
      addresses.map((to) => plainMail(to)),
    )

    await Promise.all([a.deliverDue(), b.deliverDue(), a.deliverDue(), b.deliverDue()])
    const sent = [...mailerA.sent, ...mailerB.sent]
    const rows = await first('outbox').whereIn('to', addresses)

    expect(sent.map((m) => m.to).sort()).toEqual([...addresses].sort())
    expect(new Set(sent.map((m) => m.messageId)).size).toBe(addresses.length)
    expect(rows.every((r) => r.status === 'sent' && r.attempts === 1)).toBe(true)
    // Both took part: the claim, not luck of timing, kept them apart.
    expect(mailerA.sent.length).toBeGreaterThan(0)
    expect(mailerB.sent.length).toBeGreaterThan(0)
    await first.destroy()
    await second.destroy()
  })

  it('in one process, with two outboxes on one connection, never send a row twice', async () => {
    const t = await buildApp()
    const mailer = recordingMailer()
    mailer.delayMs = 2
    const a = outboxOn(t.knex, mailer, t.config, systemClock)
    const b = outboxOn(t.knex, mailer, t.config, systemClock)
    const addresses = Array.from({ length: 10 }, (_, i) => `once.${i}@example.test`)
    await queueMails(
      t.knex,
      a,
      addresses.map((to) => plainMail(to)),
    )

    await Promise.all([a.deliverDue(), b.deliverDue()])

    expect(mailer.sent.map((m) => m.to).sort()).toEqual([...addresses].sort())
    await t.close()
  })
})

describe('the Message-ID of a mail', () => {
  it('is made at enqueue in the form RFC 5322 asks, on the host of MAIL_FROM, and kept on every try', async () => {
    const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
    const t = await buildApp({ clock })
    const mailer = recordingMailer()
    const outbox = outboxOn(t.knex, mailer, t.config, clock)
    const [id] = await queueMails(t.knex, outbox, [plainMail('steady@example.test')])
    const stored: { message_id: string } = await t.knex('outbox').where({ id }).first()

    mailer.failing = true
    await outbox.deliverDue()
    clock.advance(t.config.mail.retryMaxMs)
    await outbox.deliverDue()
    mailer.failing = false
    clock.advance(t.config.mail.retryMaxMs)
    await outbox.deliverDue()

    expect(stored.message_id).toMatch(MSG_ID)
    expect(stored.message_id).toMatch(new RegExp(`^<outbox-${id}\\.[0-9a-f]+@ringdown\\.test>$`))
    expect(mailer.tries.map((m) => m.messageId)).toEqual([
      stored.message_id,
      stored.message_id,
      stored.message_id,
    ])
    await t.close()
  })
})

describe('a mail a killed process left "sending"', () => {
  let smtp: FakeSmtp
  let t: TestApp
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  beforeAll(async () => {
    smtp = await startFakeSmtp()
    t = await buildApp({ clock })
  })
  afterAll(async () => {
    await t.close()
    await smtp.close()
  })

  const claimAs = (id: number, claimedAt: Date) =>
    t
      .knex('outbox')
      .where({ id })
      .update({ status: 'sending', claimed_at: claimedAt.toISOString(), attempts: 1 })

  it('goes again with the same Message-ID, and the mailbox keeps one copy', async () => {
    const mailer = smtpMailer({ host: '127.0.0.1', port: smtp.port })
    const outbox = outboxOn(t.knex, mailer, t.config, clock)
    const [id] = await queueMails(t.knex, outbox, [plainMail('crash@example.test')])
    const row = await t.knex('outbox').where({ id }).first()
    // The killed process had got the mail through before it died, but never wrote so.
    await mailer.send({
      from: t.config.mailFrom,
      to: row.to,
      subject: row.subject,
      text: row.text,
      html: row.html,
      messageId: row.message_id,
    })
    await claimAs(id, new Date(clock.now().getTime() - 10 * 60_000))

    await outbox.deliverDue()
    const after = await t.knex('outbox').where({ id }).first()
    const copies = smtp.mailbox.list().filter((m) => m.to === 'crash@example.test')

    expect(after).toMatchObject({ status: 'sent', message_id: row.message_id, attempts: 2 })
    expect(copies).toHaveLength(1)
    expect(copies[0].messageId).toBe(row.message_id)
  })

  it('is left alone while its claim is younger than the lease: its process may be sending it', async () => {
    const mailer = recordingMailer()
    const outbox = outboxOn(t.knex, mailer, t.config, clock)
    const [id] = await queueMails(t.knex, outbox, [plainMail('alive@example.test')])
    await claimAs(id, clock.now())

    await outbox.deliverDue()
    const untouched = await t.knex('outbox').where({ id }).first()
    const triesWhileClaimed = mailer.tries.length
    clock.advance(2 * t.config.mail.sendTimeoutMs + 60_000)
    await outbox.deliverDue()
    const resent = await t.knex('outbox').where({ id }).first()

    expect(untouched.status).toBe('sending')
    expect(triesWhileClaimed).toBe(0)
    expect(resent.status).toBe('sent')
    expect(mailer.sent.map((m) => m.messageId)).toEqual([untouched.message_id])
  })
})

describe('the local mail fake', () => {
  it('keeps one copy of a message sent twice with one Message-ID, and both of two different ones', async () => {
    const smtp = await startFakeSmtp()
    const mailer = smtpMailer({ host: '127.0.0.1', port: smtp.port })
    const mail = (messageId: string) => ({
      from: 'Ringdown <no-reply@ringdown.test>',
      to: 'twice@example.test',
      subject: 'Same',
      text: 'Hi',
      html: '<p>Hi</p>',
      messageId,
    })

    await mailer.send(mail('<outbox-1.aa@ringdown.test>'))
    await mailer.send(mail('<outbox-1.aa@ringdown.test>'))
    await mailer.send(mail('<outbox-2.bb@ringdown.test>'))

    expect(smtp.mailbox.list().map((m) => m.messageId)).toEqual([
      '<outbox-2.bb@ringdown.test>',
      '<outbox-1.aa@ringdown.test>',
    ])
    await smtp.close()
  })
})
