import { afterEach, describe, expect, it } from 'vitest'
import { systemClock } from '../../../server/clock'
import { testConfig } from '../../../server/config'
import { smtpMailer } from '../../../server/mail/transport'
import { buildApp, type TestApp } from '../helpers'
import { outboxOn, plainMail, queueMails, silentServer } from './fixtures'

// A mail server that accepts connections and never answers must not hold the outbox. SMTP
// begins with the server's 220 greeting (RFC 5321 §3.1, §4.2): a client that gets none gives up
// after the greeting timeout, and the run leaves the other mails for the next tick instead of
// letting each wait out the same timeout.

const configWith = (sendTimeoutMs: number) =>
  testConfig({
    mail: {
      maxAttempts: 3,
      retryBaseMs: 1000,
      retryMaxMs: 8000,
      connectTimeoutMs: 300,
      sendTimeoutMs,
      pollMs: 0,
    },
  })

let t: TestApp | undefined
let server: Awaited<ReturnType<typeof silentServer>> | undefined
afterEach(async () => {
  await t?.close()
  await server?.close()
  t = server = undefined
})

async function outboxAgainst(greet: boolean, mails: number, sendTimeoutMs: number) {
  const config = configWith(sendTimeoutMs)
  server = await silentServer(greet)
  t = await buildApp({ config })
  const outbox = outboxOn(
    t.knex,
    smtpMailer({ host: '127.0.0.1', port: server.port }),
    config,
    systemClock,
  )
  await queueMails(
    t.knex,
    outbox,
    Array.from({ length: mails }, (_, i) => plainMail(`hang.${i}@example.test`)),
  )
  const rows = () =>
    t!.knex('outbox').where('to', 'like', 'hang.%').orderBy('id').select('attempts', 'last_error')
  const timed = async () => {
    const started = performance.now()
    await outbox.deliverDue()
    return performance.now() - started
  }
  return { outbox, rows, timed }
}

describe('a mail server that accepts and never greets', () => {
  it('costs about one connect timeout per run, not one per mail', async () => {
    const { rows, timed } = await outboxAgainst(false, 6, 3000)

    const first = await timed()
    const afterFirst = await rows()
    const second = await timed()

    // One greeting timeout (300 ms), well under the 6 × 300 ms of waiting once per mail and
    // under the 3 s bound of a whole send: the greeting timeout itself did its work.
    expect(first).toBeGreaterThanOrEqual(250)
    expect(first).toBeLessThan(1200)
    expect(second).toBeLessThan(1200)
    expect(afterFirst.map((r) => r.attempts)).toEqual([1, 0, 0, 0, 0, 0])
    expect(afterFirst[0].last_error).toMatch(/greeting|timeout/i)
    expect(server!.connections()).toBe(2)
    // The next run tried the next mail in turn, not the same one again.
    expect((await rows()).map((r) => r.attempts)).toEqual([1, 1, 0, 0, 0, 0])
  })
})

describe('a mail server that greets and then falls silent', () => {
  it('is cut off at sendTimeoutMs, and the mail waits for its next try', async () => {
    const { rows, timed } = await outboxAgainst(true, 3, 700)

    const took = await timed()
    const [first, ...rest] = await rows()

    expect(took).toBeGreaterThanOrEqual(600)
    expect(took).toBeLessThan(1500)
    expect(first.attempts).toBe(1)
    expect(first.last_error).toMatch(/did not take the mail within 0.7 s|timeout/i)
    expect(rest.map((r) => r.attempts)).toEqual([0, 0])
    // The client ended the conversation: the socket is closed, not left hanging.
    await new Promise((r) => setTimeout(r, 50))
    expect(server!.closedByClient()).toBe(1)
  })
})

describe('a mail server that refuses connections', () => {
  it('costs one refused connection per run', async () => {
    server = await silentServer(false)
    const port = server.port
    await server.close()
    server = undefined
    const config = configWith(3000)
    t = await buildApp({ config })
    const outbox = outboxOn(t.knex, smtpMailer({ host: '127.0.0.1', port }), config, systemClock)
    await queueMails(
      t.knex,
      outbox,
      [0, 1, 2].map((i) => plainMail(`refused.${i}@example.test`)),
    )

    await outbox.deliverDue()
    const tried = await t.knex('outbox').where('to', 'like', 'refused.%').orderBy('id')

    expect(tried.map((r) => r.attempts)).toEqual([1, 0, 0])
    expect(tried[0].last_error).toMatch(/ECONNREFUSED/)
  })
})
