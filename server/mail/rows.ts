import type { MailItem, MailStatus } from '../../shared/schemas/audit'

/** One row of the outbox table. */
export interface OutboxRow {
  id: number
  to: string
  subject: string
  text: string
  html: string
  kind: string
  /** 'pending' (waiting), 'sending' (claimed by a delivery run), 'sent', 'failed'. */
  status: MailStatus
  attempts: number
  last_error: string | null
  next_attempt_at: string | null
  created_at: string
  sent_at: string | null
  /** RFC 5322 Message-ID, made at enqueue; null only on mail that went before ids were kept. */
  message_id: string | null
  claimed_at: string | null
  session_id: number | null
  invitation_id: number | null
}

/** Columns the lists read: everything but the bodies. */
export const LISTED_COLUMNS = [
  'id',
  'to',
  'subject',
  'kind',
  'status',
  'attempts',
  'last_error',
  'next_attempt_at',
  'created_at',
  'sent_at',
  'message_id',
  'session_id',
  'invitation_id',
] as const

export type ListedRow = Pick<OutboxRow, (typeof LISTED_COLUMNS)[number]>

export function toMailItem(r: ListedRow, maxAttempts: number): MailItem {
  return {
    id: r.id,
    to: r.to,
    subject: r.subject,
    kind: r.kind,
    status: r.status,
    attempts: r.attempts,
    maxAttempts: r.session_id === null ? maxAttempts : null,
    lastError: r.last_error,
    createdAt: r.created_at,
    sentAt: r.sent_at,
    nextAttemptAt: r.next_attempt_at,
    sessionId: r.session_id,
    messageId: r.message_id,
  }
}
