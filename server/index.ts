import { loadConfig } from './config'
import { createKnex } from './db/knex'
import { prepareDatabase } from './db/prepare'
import { createApp } from './app'
import { smtpMailer } from './mail/transport'
import { startFakeSmtp, type FakeSmtp } from './mail/fakeSmtp'
import { startReminderTimer } from './invitations/reminders'
import { refreshRenditionsAtStart } from './clips/refreshRenditions'

// Only start-up and listening live here; everything testable is in createApp.
const started = Date.now()
const config = loadConfig()
const knex = createKnex(config.databaseFile)
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
})
const { ctx } = app.locals

const server = app.listen(config.port, () => {
  ctx.logger.info(
    `Ringdown is ready on http://localhost:${config.port} (${Date.now() - started} ms; mail: ${
      fake ? `local fake on port ${fake.port}, read it in Admin → Mail` : 'SMTP_URL'
    })`,
  )
})

// Renditions made before every matched set shared one format and level are made again, set by
// set through the set queue, while the server already answers.
const stopRefresh = new AbortController()
const refresh = refreshRenditionsAtStart(ctx, stopRefresh.signal).catch((err: unknown) =>
  ctx.logger.error(err, 'Renditions could not be checked'),
)

// Mail that waited while SMTP was down goes out on the next tick of this timer.
void ctx.outbox.deliverDue()
const timer = setInterval(() => void ctx.outbox.deliverDue(), config.mail.pollMs || 10_000)
// Automatic reminders a set number of days before each session's deadline.
const stopReminders = startReminderTimer(ctx, Number(process.env.REMINDER_POLL_MS) || 15 * 60_000)

async function shutdown() {
  clearInterval(timer)
  stopReminders()
  stopRefresh.abort()
  server.close()
  await refresh
  await ctx.outbox.settle()
  await fake?.close()
  await knex.destroy()
  process.exit(0)
}
process.once('SIGINT', shutdown)
process.once('SIGTERM', shutdown)
