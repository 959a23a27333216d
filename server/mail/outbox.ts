/*
 * The outbox: every mail is stored first (inside the change that caused it) and handed to SMTP
 * by delivery runs. The rules, each in its own file:
 * - claims.ts: a run claims a mail before talking to SMTP, so no mail is sent twice, and mail
 *   left 'sending' by a process that died goes again with the same Message-ID;
 * - retryRule.ts: failed tries wait with capped doubling; a session's mail waits for as long as
 *   its session is open, other mail gives up after Config.mail.maxAttempts;
 * - sessionMail.ts: mail of a session that is over ends as failed with the reason;
 * - transport.ts: short timeouts on every try.
 */
import type { Knex } from 'knex'
import type { Logger } from 'pino'
import type { Clock } from '../clock'
import type { Config } from '../config'
import { conflict } from '../errors'
import type { Mailer } from './transport'
import type { MailItem, MailStatus } from '../../shared/schemas/audit'
import { messageIdHost, newMessageId } from './messageId'
import { givesUp, isServerTrouble, retryWaitMs } from './retryRule'
import { endMailOfEndedSessions, sessionEndReason } from './sessionMail'
import {
  claimMail,
  dueMail,
  markFailed,
  markSent,
  putBack,
  returnLeftClaims,
  type Claim,
} from './claims'
import { LISTED_COLUMNS, toMailItem, type ListedRow } from './rows'

export interface QueuedMail {
  to: string
  subject: string
  text: string
  html: string
  kind: string
  /** The session the mail belongs to: it is then tried for as long as the session is open. */
  sessionId?: number
  /** The invitation it is for, so the invitations list can say where its mail stands. */
  invitationId?: number
}

export interface Outbox {
  /** Stores the mail (inside the caller's transaction when given) and schedules delivery. */
  enqueue(mail: QueuedMail, trx?: Knex): Promise<number>
  /** Sends every mail that is due; safe to call at any time, never runs twice at once. */
  deliverDue(): Promise<void>
  /** Resolves when delivery started by enqueue has finished (tests wait on it). */
  settle(): Promise<void>
  /** Starts no more deliveries and gives the one in flight at most `graceMs` to finish, then
   * ends its SMTP conversation; what has not gone out waits in the outbox for the next start. */
  stop(graceMs: number): Promise<void>
  list(filter?: { status?: MailStatus }): Promise<MailItem[]>
  /** Makes a failed or waiting mail due now with its tries counted afresh; false if none. */
  retry(id: number): Promise<boolean>
}

/** Mails read per query; a run goes on to the next batch while the server answers. */
const BATCH = 50

class SendTimeout extends Error {
  constructor(ms: number) {
    super(`The mail server did not take the mail within ${ms / 1000} s`)
    this.name = 'SendTimeout'
  }
}

class Stopping extends Error {
  constructor() {
    super('The outbox is stopping')
    this.name = 'Stopping'
  }
}

/** Rejects with the signal's reason once it aborts. */
function whenAborted(signal: AbortSignal): Promise<never> {
  return new Promise((_resolve, reject) => {
    if (signal.aborted) reject(signal.reason)
    else signal.addEventListener('abort', () => reject(signal.reason), { once: true })
  })
}

export function createOutbox(deps: {
  knex: Knex
  mailer: Mailer
  clock: Clock
  config: Config
  logger: Logger
}): Outbox {
  const { knex, mailer, clock, config, logger } = deps
  const { maxAttempts, retryBaseMs, retryMaxMs, connectTimeoutMs } = config.mail
  // 0 would cut every try off at once; it falls back to the default bound.
  const sendTimeoutMs = config.mail.sendTimeoutMs || 30_000
  const host = messageIdHost(config.mailFrom)
  // Longer than any live try can take (each is cut at sendTimeoutMs), so a claim older than
  // this belongs to a process that died.
  const claimLeaseMs = Math.max(2 * sendTimeoutMs, 60_000)
  const stopping = new AbortController()
  let running: Promise<void> | null = null
  let again = false
  let stopped = false

  /**
   * One SMTP conversation, ended at sendTimeoutMs or when the outbox stops, even with a mailer
   * that ignores the signal: the run never waits longer than that for one mail.
   */
  async function sendWithin(claim: Claim): Promise<void> {
    const attempt = new AbortController()
    const timer = setTimeout(() => attempt.abort(new SendTimeout(sendTimeoutMs)), sendTimeoutMs)
    const onStop = () => attempt.abort(new Stopping())
    if (stopping.signal.aborted) onStop()
    else stopping.signal.addEventListener('abort', onStop, { once: true })
    try {
      await Promise.race([
        mailer.send(
          {
            from: config.mailFrom,
            to: claim.row.to,
            subject: claim.row.subject,
            text: claim.row.text,
            html: claim.row.html,
            messageId: claim.messageId,
          },
          { signal: attempt.signal, timeouts: { connectTimeoutMs, sendTimeoutMs } },
        ),
        whenAborted(attempt.signal),
      ])
    } catch (err) {
      // Whichever rejected first, an abort is reported by its reason (timeout or stopping).
      throw attempt.signal.aborted ? attempt.signal.reason : err
    } finally {
      clearTimeout(timer)
      stopping.signal.removeEventListener('abort', onStop)
    }
  }

  /** One try of one claimed mail; says whether the run should go on. */
  async function tryOne(claim: Claim): Promise<'go_on' | 'wait_for_next_tick'> {
    const { row, attempts } = claim
    try {
      await sendWithin(claim)
    } catch (err) {
      if (err instanceof Stopping) {
        await putBack(knex, row.id, clock.now())
        return 'wait_for_next_tick'
      }
      const failed = givesUp(row.session_id, attempts, maxAttempts)
      const wait = retryWaitMs(attempts, retryBaseMs, retryMaxMs)
      const message = String((err as Error)?.message ?? err)
      await markFailed(
        knex,
        row.id,
        message,
        failed ? null : new Date(clock.now().getTime() + wait),
      )
      logger.warn({ mailId: row.id, attempts, failed, err: message }, 'mail delivery failed')
      return isServerTrouble(err) ? 'wait_for_next_tick' : 'go_on'
    }
    await markSent(knex, row.id, clock.now())
    return 'go_on'
  }

  /** One batch; 'more' when a full batch went and others may be due. */
  async function deliverBatch(): Promise<'done' | 'more' | 'wait_for_next_tick'> {
    const now = clock.now()
    await returnLeftClaims(knex, now, claimLeaseMs)
    await endMailOfEndedSessions(knex, now)
    const due = await dueMail(knex, now, BATCH)
    let tried = 0
    for (const row of due) {
      if (stopped) return 'wait_for_next_tick'
      const claim = await claimMail(knex, row, clock.now(), host)
      if (!claim) continue
      tried++
      // After a failure to reach the server the rest wait for the next tick instead of each
      // waiting out the same timeout; they keep their place and their count of tries.
      if ((await tryOne(claim)) === 'wait_for_next_tick') return 'wait_for_next_tick'
    }
    // Another batch only when this one moved something: rows that could not be claimed would
    // be read again and again.
    return due.length === BATCH && tried > 0 ? 'more' : 'done'
  }

  function deliverDue(): Promise<void> {
    if (stopped) return Promise.resolve()
    if (running) {
      again = true
      return running
    }
    running = (async () => {
      let end: Awaited<ReturnType<typeof deliverBatch>>
      do {
        again = false
        end = await deliverBatch()
      } while ((end === 'more' || (end === 'done' && again)) && !stopped)
      again = false
    })()
      .catch((err) => logger.error({ err }, 'outbox run failed'))
      .finally(() => {
        running = null
      })
    return running
  }

  return {
    async enqueue(mail, trx) {
      const db = trx ?? knex
      const [id] = (await db('outbox').insert({
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        html: mail.html,
        kind: mail.kind,
        status: 'pending',
        created_at: clock.now().toISOString(),
        session_id: mail.sessionId ?? null,
        invitation_id: mail.invitationId ?? null,
      })) as number[]
      // The id is fixed here, before any try, and is repeated on every try of this mail.
      await db('outbox')
        .where({ id })
        .update({ message_id: newMessageId(id, host) })
      // Delivery waits for the caller's transaction to commit: a rolled-back change sends nothing.
      if (!trx) void deliverDue()
      return id
    },
    deliverDue,
    async settle() {
      while (running) await running
    },
    async stop(graceMs) {
      stopped = true
      again = false
      if (!running) return
      const inFlight = running
      let timer: NodeJS.Timeout | undefined
      const finished = await Promise.race([
        inFlight.then(() => true),
        new Promise<false>((r) => (timer = setTimeout(() => r(false), graceMs))),
      ])
      clearTimeout(timer)
      if (finished) return
      // Past the grace: end the conversation; the mail goes back to waiting (claims.ts).
      stopping.abort()
      await inFlight
    },
    async list(filter = {}) {
      const q = knex('outbox')
        .orderBy('id', 'desc')
        .limit(500)
        .select(...LISTED_COLUMNS)
      if (filter.status) q.where({ status: filter.status })
      const rows: ListedRow[] = await q
      return rows.map((r) => toMailItem(r, maxAttempts))
    },
    async retry(id) {
      const row: { status: string; session_id: number | null } | undefined = await knex('outbox')
        .where({ id })
        .first('status', 'session_id')
      if (!row || (row.status !== 'failed' && row.status !== 'pending')) return false
      if (row.session_id !== null) {
        const session: { status: string; deadline: string } | undefined = await knex('sessions')
          .where({ id: row.session_id })
          .first('status', 'deadline')
        if (sessionEndReason(session, clock.now()))
          throw conflict(
            'This mail belongs to a session that takes no more mail (closed, or past its deadline), so it cannot be sent again',
          )
      }
      const n = await knex('outbox')
        .where({ id })
        .whereIn('status', ['failed', 'pending'])
        .update({ status: 'pending', next_attempt_at: null, attempts: 0 })
      if (n) void deliverDue()
      return n > 0
    },
  }
}
