/*
 * Taking a mail for one try and recording how the try ended. A try is claimed before the SMTP
 * conversation starts: the row turns 'sending' with its claim time in a conditional UPDATE
 * (`where status = 'pending'`) that commits on its own, and only the run whose UPDATE changed
 * the row sends it. Two runs, or two processes on one database, can never both send a row.
 *
 * A crash (kill -9, power cut) between the claim and its outcome leaves the row 'sending'. Such
 * a row is not sent again blindly and not lost: once its claim is older than the claim lease,
 * longer than any live try can take, it is put back to waiting and sent again with the same
 * Message-ID, so a receiving side that already has the mail can recognise the repeat (the local
 * mail fake keeps one copy per Message-ID). A row claimed by a process that is still sending is
 * younger than the lease and is left alone. Had the mail server already taken the mail when the
 * process died, the second copy is unavoidable in SMTP (RFC 5321 has no way to ask); the same
 * Message-ID is what lets it be recognised.
 */
import type { Knex } from 'knex'
import { newMessageId } from './messageId'
import { sessionsTakingMail } from './sessionMail'
import type { OutboxRow } from './rows'

export const LEFT_SENDING_NOTE =
  'The server stopped while handing this mail over; it goes again with the same Message-ID'
export const STOPPED_NOTE =
  'The server was stopping before the mail server took this mail; it goes again with the same Message-ID'

export interface Claim {
  row: OutboxRow
  messageId: string
  /** Tries so far, this one included: a try counts from its claim. */
  attempts: number
}

const dueBy = (at: string) => (q: Knex.QueryBuilder) =>
  q.whereNull('next_attempt_at').orWhere('next_attempt_at', '<=', at)

/**
 * Waiting mail whose time has come, the one due longest first: while the mail server is down
 * each run tries one mail, and this way the tries go round the waiting mail in turn.
 */
export function dueMail(knex: Knex, now: Date, limit: number): Promise<OutboxRow[]> {
  return knex('outbox')
    .where({ status: 'pending' })
    .andWhere(dueBy(now.toISOString()))
    .orderByRaw('coalesce(next_attempt_at, created_at), id')
    .limit(limit)
}

/**
 * Claims the row for this run, or returns null when another run took it, its time moved, or its
 * session stopped taking mail since it was read. A row without a Message-ID (queued before ids
 * were kept) gets one here, committed with the claim, so every later try repeats it.
 */
export async function claimMail(
  knex: Knex,
  row: OutboxRow,
  now: Date,
  host: string,
): Promise<Claim | null> {
  const at = now.toISOString()
  const changed = await knex('outbox')
    .where({ id: row.id, status: 'pending' })
    .andWhere(dueBy(at))
    .andWhere((q) =>
      q.whereNull('session_id').orWhereIn('session_id', sessionsTakingMail(knex, now)),
    )
    .update({
      status: 'sending',
      claimed_at: at,
      attempts: knex.raw('attempts + 1'),
      message_id: knex.raw('coalesce(message_id, ?)', [newMessageId(row.id, host)]),
    })
  if (!changed) return null
  const claimed: { message_id: string; attempts: number } = await knex('outbox')
    .where({ id: row.id })
    .first('message_id', 'attempts')
  return { row, messageId: claimed.message_id, attempts: claimed.attempts }
}

export async function markSent(knex: Knex, id: number, now: Date): Promise<void> {
  await knex('outbox').where({ id, status: 'sending' }).update({
    status: 'sent',
    sent_at: now.toISOString(),
    claimed_at: null,
    last_error: null,
    next_attempt_at: null,
  })
}

/** A failed try: waiting again from `nextAt`, or failed for good when `nextAt` is null. */
export async function markFailed(
  knex: Knex,
  id: number,
  error: string,
  nextAt: Date | null,
): Promise<void> {
  await knex('outbox')
    .where({ id, status: 'sending' })
    .update({
      status: nextAt ? 'pending' : 'failed',
      claimed_at: null,
      last_error: error.slice(0, 500),
      next_attempt_at: nextAt?.toISOString() ?? null,
    })
}

/** A try cut short by this process stopping: the mail waits for the next start. */
export async function putBack(knex: Knex, id: number, now: Date): Promise<void> {
  await knex('outbox').where({ id, status: 'sending' }).update({
    status: 'pending',
    claimed_at: null,
    last_error: STOPPED_NOTE,
    next_attempt_at: now.toISOString(),
  })
}

/** Rows left 'sending' by a process that died: back to waiting, due now, Message-ID kept. */
export async function returnLeftClaims(knex: Knex, now: Date, leaseMs: number): Promise<number> {
  const before = new Date(now.getTime() - leaseMs).toISOString()
  return knex('outbox')
    .where({ status: 'sending' })
    .andWhere((q) => q.whereNull('claimed_at').orWhere('claimed_at', '<=', before))
    .update({
      status: 'pending',
      claimed_at: null,
      last_error: LEFT_SENDING_NOTE,
      next_attempt_at: now.toISOString(),
    })
}
