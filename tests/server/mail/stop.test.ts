import { afterEach, describe, expect, it } from 'vitest'
import { systemClock } from '../../../server/clock'
import { testConfig } from '../../../server/config'
import { smtpMailer } from '../../../server/mail/transport'
import { buildApp, type TestApp } from '../helpers'
import { outboxOn, plainMail, queueMails, recordingMailer, silentServer } from './fixtures'

// At SIGTERM the outbox stops: no new tries, the one in flight gets the grace and is then cut
// off, and whatever did not go waits, with its Message-ID, for the next start.

// A whole send may take 10 s here, far beyond the grace, so only stop() can end it early.
const config = testConfig({
  mail: {
    maxAttempts: 3,
    retryBaseMs: 1000,
    retryMaxMs: 8000,
    connectTimeoutMs: 10_000,
    sendTimeoutMs: 10_000,
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

describe('stopping the outbox', () => {
  it('ends the SMTP conversation within the grace and leaves the mail waiting with its Message-ID', async () => {
    server = await silentServer(true)
    t = await buildApp({ config })
    const outbox = outboxOn(
      t.knex,
      smtpMailer({ host: '127.0.0.1', port: server.port }),
      config,
      systemClock,
    )
    const ids = await queueMails(t.knex, outbox, [
      plainMail('inflight@example.test'),
      plainMail('next@example.test'),
    ])
    const queued = await t.knex('outbox').whereIn('id', ids).orderBy('id')

    const run = outbox.deliverDue()
    while (server.connections() === 0) await new Promise((r) => setTimeout(r, 10))
    const started = performance.now()
    await outbox.stop(200)
    const took = performance.now() - started
    await run
    await new Promise((r) => setTimeout(r, 50))
    const rows = await t.knex('outbox').whereIn('id', ids).orderBy('id')

    expect(took).toBeGreaterThanOrEqual(150)
    expect(took).toBeLessThan(1500)
    expect(server.closedByClient()).toBe(1)
    expect(rows.map((r) => r.status)).toEqual(['pending', 'pending'])
    expect(rows.map((r) => r.message_id)).toEqual(queued.map((r) => r.message_id))
    expect(rows[0].claimed_at).toBeNull()
    expect(rows[0].last_error).toMatch(/stopping before the mail server took this mail/)
    // The other mail was never tried.
    expect(rows[1].attempts).toBe(0)
  })

  it('lets a try that ends within the grace finish, and starts no more', async () => {
    t = await buildApp({ config })
    const mailer = recordingMailer()
    mailer.delayMs = 50
    const outbox = outboxOn(t.knex, mailer, config, systemClock)
    const ids = await queueMails(t.knex, outbox, [
      plainMail('quick@example.test'),
      plainMail('later@example.test'),
    ])

    const run = outbox.deliverDue()
    await new Promise((r) => setTimeout(r, 10))
    await outbox.stop(2000)
    await run
    await outbox.deliverDue()
    const rows = await t.knex('outbox').whereIn('id', ids).orderBy('id')

    expect(rows.map((r) => r.status)).toEqual(['sent', 'pending'])
    expect(mailer.tries.map((m) => m.to)).toEqual(['quick@example.test'])
  })

  it('returns at once when nothing is in flight', async () => {
    t = await buildApp({ config })
    const outbox = outboxOn(t.knex, recordingMailer(), config, systemClock)

    const started = performance.now()
    await outbox.stop(5000)

    expect(performance.now() - started).toBeLessThan(100)
  })
})
