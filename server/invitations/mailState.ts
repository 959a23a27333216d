/*
 * Where each invitation's mail stands, read from the outbox: staff see an invitation whose mail
 * has not gone out as waiting for the mail server, with the last problem and the next try,
 * rather than as sent.
 */
import type { Knex } from 'knex'
import type { InvitationMail } from '../../shared/schemas/sessions'

interface MailRow {
  id: number
  invitation_id: number
  kind: string
  status: string
  attempts: number
  last_error: string | null
  next_attempt_at: string | null
  created_at: string
  sent_at: string | null
}

const COLUMNS = [
  'id',
  'invitation_id',
  'kind',
  'status',
  'attempts',
  'last_error',
  'next_attempt_at',
  'created_at',
  'sent_at',
] as const

export function toInvitationMail(r: MailRow): InvitationMail {
  const waiting = r.status === 'pending' || r.status === 'sending'
  return {
    kind: r.kind === 'session_reminder' ? 'reminder' : 'invitation',
    state: waiting ? 'waiting' : r.status === 'sent' ? 'sent' : 'failed',
    queuedAt: r.created_at,
    sentAt: r.sent_at,
    attempts: r.attempts,
    lastError: r.last_error,
    nextTryAt: waiting ? r.next_attempt_at : null,
  }
}

/** The latest mail of each of the session's invitations, by invitation id. */
export async function sessionMailStates(
  db: Knex,
  sessionId: number,
): Promise<Map<number, InvitationMail>> {
  const rows: MailRow[] = await db('outbox')
    .whereIn(
      'id',
      db('outbox')
        .where({ session_id: sessionId })
        .whereNotNull('invitation_id')
        .groupBy('invitation_id')
        .max('id'),
    )
    .select(...COLUMNS)
  return new Map(rows.map((r) => [r.invitation_id, toInvitationMail(r)]))
}

/** The latest mail of one invitation, or null when none was queued through the outbox. */
export async function invitationMailState(
  db: Knex,
  invitationId: number,
): Promise<InvitationMail | null> {
  const row: MailRow | undefined = await db('outbox')
    .where({ invitation_id: invitationId })
    .orderBy('id', 'desc')
    .first(...COLUMNS)
  return row ? toInvitationMail(row) : null
}
