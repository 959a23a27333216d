import { loadConfig } from './config'
import { createKnex } from './db/knex'
import { prepareDatabase } from './db/prepare'
import { createApp } from './app'
import { smtpMailer } from './mail/transport'
import { startFakeSmtp, type FakeSmtp } from './mail/fakeSmtp'
import { startReminderTimer } from './invitations/reminders'
import { refreshRenditionsAtStart } from './clips/refreshRenditions'

// Only start-up, listening and shutdown live here; everything testable is in createApp.
const started = Date.now()
const config = loadConfig()
const metricsToken = process.env.METRICS_TOKEN || undefined
if (metricsToken && metricsToken.length < 16)
  throw new Error('METRICS_TOKEN must be at least 16 characters: `openssl rand -base64 32`')
const knex = createKnex(config.databaseFile, { synchronous: config.databaseSynchronous })
await prepareDatabase(knex)

let fake: FakeSmtp | undefined
if (!config.smtpUrl) {
  if (config.env === 'production') throw new Error('SMTP_URL is required when NODE_ENV=production')
  fake = await startFakeSmtp(Number(process.env.SMTP_FAKE_PORT ?? 0))
}
const mailer = config.smtpUrl
  ? smtpMailer(config.smtpUrl)
  : smtpMailer({ host: '127.0.0.1', port: fake!.port })

const app = createApp({
  knex,
  config,
  mailer,
  mailbox: fake?.mailbox,
  serveClient: process.env.RINGDOWN_API_ONLY !== '1',
  metricsToken,
})
const { ctx } = app.locals

const server = app.listen(config.port, () => {
  ctx.logger.info(
    `Ringdown is ready on http://localhost:${config.port} (${Date.now() - started} ms; mail: ${
      fake ? `local fake on port ${fake.port}, read it in Admin → Mail` : 'SMTP_URL'
    })`,
  )
})

// ── Background work started with the server; each one is stopped in shutdown() below. ──

// Renditions made before every matched set shared one format and level are made again, set by
// set through the set queue, while the server already answers.
const stopRefresh = new AbortController()
const refresh = refreshRenditionsAtStart(ctx, stopRefresh.signal).catch((err: unknown) =>
  ctx.logger.error(err, 'Renditions could not be checked'),
)

// What a killed process left in the media folder (upload parts, originals and renditions no
// clip names) is removed once the previous process must have exited, then every SWEEP_MINUTES.
const { startMediaSweep } = await import('./clips/sweep')
const mediaSweep = startMediaSweep(ctx)

// Mail that waited while SMTP was down goes out on the next tick of this timer.
void ctx.outbox.deliverDue()
const timer = setInterval(() => void ctx.outbox.deliverDue(), config.mail.pollMs || 10_000)
// Automatic reminders a set number of days before each session's deadline.
const stopReminders = startReminderTimer(ctx, Number(process.env.REMINDER_POLL_MS) || 15 * 60_000)

// ── Shutdown ──

/** Past the grace, what is left (closing the pool, the database) gets this long. */
const SHUTDOWN_MARGIN_MS = 1500
const CLOSE_IDLE_EVERY_MS = 100

/** Resolves with true when `p` settles within `ms`, false otherwise; never rejects. */
function within(p: Promise<unknown>, ms: number): Promise<boolean> {
  let t: NodeJS.Timeout | undefined
  return Promise.race([
    p.then(
      () => true,
      () => true,
    ),
    new Promise<boolean>((r) => (t = setTimeout(() => r(false), ms))),
  ]).finally(() => clearTimeout(t))
}

let stopping = false

/**
 * SIGTERM and SIGINT: stop taking connections, let requests in flight finish, give the mail in
 * flight the same grace (then it waits in the outbox for the next start), then close threads
 * and the database. Whatever hangs, a hard timer ends the process with code 1 at
 * shutdownGraceMs + SHUTDOWN_MARGIN_MS, within what process managers wait (10 s is common).
 */
async function shutdown(signal: string) {
  if (stopping) return
  stopping = true
  const graceMs = config.shutdownGraceMs
  const hard = setTimeout(() => {
    ctx.logger.error(`Shutdown took longer than ${graceMs + SHUTDOWN_MARGIN_MS} ms; exiting`)
    process.exit(1)
  }, graceMs + SHUTDOWN_MARGIN_MS)
  hard.unref()
  ctx.logger.info(`${signal}: finishing requests in flight, then stopping`)

  clearInterval(timer)
  stopReminders()
  stopRefresh.abort()

  // A keep-alive connection turns idle when its request ends; close those as they do.
  const closed = new Promise<void>((r) => server.close(() => r()))
  server.closeIdleConnections()
  const idle = setInterval(() => server.closeIdleConnections(), CLOSE_IDLE_EVERY_MS)
  const [requestsDone] = await Promise.all([
    within(closed, graceMs),
    ctx.outbox.stop(graceMs).catch((err: unknown) => ctx.logger.error({ err }, 'outbox stop')),
    within(refresh, graceMs),
    within(mediaSweep.stop(), graceMs),
  ])
  clearInterval(idle)
  if (!requestsDone) {
    ctx.logger.warn('Requests still running after the grace were cut off')
    server.closeAllConnections()
  }

  try {
    await ctx.pool.close()
    // The local mail catcher waits for its open conversations; it holds nothing worth waiting for.
    if (fake) await within(fake.close(), 500)
    await knex.destroy()
  } catch (err) {
    ctx.logger.error({ err }, 'Shutdown did not close everything')
    process.exit(1)
  }
  clearTimeout(hard)
  process.exit(0)
}
process.once('SIGINT', () => void shutdown('SIGINT'))
process.once('SIGTERM', () => void shutdown('SIGTERM'))
