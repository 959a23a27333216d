import type { Knex } from 'knex'
import type { Logger } from 'pino'
import type { Clock } from '../clock'
import type { Config } from '../config'
import type { Mailer } from './transport'
import type { MailItem } from '../../shared/schemas/audit'

export interface QueuedMail {
  to: string
  subject: string
  text: string
  html: string
  kind: string
}

export interface Outbox {
  /** Stores the mail (inside the caller's transaction when given) and schedules delivery. */
  enqueue(mail: QueuedMail, trx?: Knex): Promise<number>
  /** Sends every mail that is due; safe to call at any time, never runs twice at once. */
  deliverDue(): Promise<void>
  /** Resolves when delivery started by enqueue has finished (tests wait on it). */
  settle(): Promise<void>
  /** Starts no more deliveries and gives the one in flight at most `graceMs` to finish; what
   * has not gone out stays in the outbox for the next start. */
  stop(graceMs: number): Promise<void>
  list(filter?: { status?: string }): Promise<MailItem[]>
  retry(id: number): Promise<boolean>
}

interface OutboxRow {
  id: number
  to: string
  subject: string
  text: string
  html: string
  kind: string
  status: string
  attempts: number
  last_error: string | null
  next_attempt_at: string | null
  created_at: string
  sent_at: string | null
}

export function createOutbox(deps: {
  knex: Knex
  mailer: Mailer
  clock: Clock
  config: Config
  logger: Logger
}): Outbox {
  const { knex, mailer, clock, config, logger } = deps
  let running: Promise<void> | null = null
  let again = false
  let stopped = false

  async function deliverOnce(): Promise<void> {
    const now = clock.now().toISOString()
    const due: OutboxRow[] = await knex('outbox')
      .where({ status: 'pending' })
      .andWhere((q) => q.whereNull('next_attempt_at').orWhere('next_attempt_at', '<=', now))
      .orderBy('id')
      .limit(50)
    for (const row of due) {
      try {
        await mailer.send({
          from: config.mailFrom,
          to: row.to,
          subject: row.subject,
          text: row.text,
          html: row.html,
        })
        await knex('outbox')
          .where({ id: row.id })
          .update({
            status: 'sent',
            attempts: row.attempts + 1,
            sent_at: clock.now().toISOString(),
            last_error: null,
            next_attempt_at: null,
          })
      } catch (err) {
        const attempts = row.attempts + 1
        const failed = attempts >= config.mail.maxAttempts
        // Exponential back-off so a mail server that is down for an hour is not hammered.
        const wait = config.mail.retryBaseMs * 2 ** (attempts - 1)
        await knex('outbox')
          .where({ id: row.id })
          .update({
            status: failed ? 'failed' : 'pending',
            attempts,
            last_error: String((err as Error).message ?? err).slice(0, 500),
            next_attempt_at: failed ? null : new Date(clock.now().getTime() + wait).toISOString(),
          })
        logger.warn({ mailId: row.id, attempts, failed }, 'mail delivery failed')
      }
    }
  }

  function deliverDue(): Promise<void> {
    if (stopped) return Promise.resolve()
    if (running) {
      again = true
      return running
    }
    running = (async () => {
      do {
        again = false
        await deliverOnce()
      } while (again && !stopped)
    })()
      .catch((err) => logger.error({ err }, 'outbox run failed'))
      .finally(() => {
        running = null
      })
    return running
  }

  return {
    async enqueue(mail, trx) {
      const [id] = await (trx ?? knex)('outbox').insert({
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        html: mail.html,
        kind: mail.kind,
        status: 'pending',
        created_at: clock.now().toISOString(),
      })
      // Delivery waits for the caller's transaction to commit: a rolled-back change sends nothing.
      if (!trx) void deliverDue()
      return id as number
    },
    deliverDue,
    async settle() {
      while (running) await running
    },
    async stop(graceMs) {
      stopped = true
      if (running)
        await Promise.race([running, new Promise((r) => setTimeout(r, graceMs).unref())])
    },
    async list(filter = {}) {
      const q = knex<OutboxRow>('outbox').orderBy('id', 'desc').limit(500)
      if (filter.status) q.where({ status: filter.status })
      const rows: OutboxRow[] = await q
      return rows.map((r) => ({
        id: r.id,
        to: r.to,
        subject: r.subject,
        status: r.status as MailItem['status'],
        attempts: r.attempts,
        lastError: r.last_error,
        createdAt: r.created_at,
        sentAt: r.sent_at,
        nextAttemptAt: r.next_attempt_at,
      }))
    },
    async retry(id) {
      const n = await knex('outbox')
        .where({ id })
        .whereIn('status', ['failed', 'pending'])
        .update({ status: 'pending', next_attempt_at: null, attempts: 0 })
      if (n) void deliverDue()
      return n > 0
    },
  }
}
