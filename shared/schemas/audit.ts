import { z } from 'zod'
import { LIMITS } from '../constants'

export const listAuditQuery = z.object({
  action: z.string().trim().max(60).optional(),
  actor: z.string().trim().max(LIMITS.emailMax).optional(),
  q: z.string().trim().max(LIMITS.searchMax).optional(),
  from: z.iso.date().optional(),
  to: z.iso.date().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
  offset: z.coerce.number().int().min(0).default(0),
})
export type ListAuditQuery = z.infer<typeof listAuditQuery>

export interface AuditEntry {
  id: number
  at: string
  actorEmail: string | null
  action: string
  targetType: string | null
  targetId: string | null
  details: Record<string, unknown>
  ip: string | null
}

/**
 * Where a mail in the outbox stands: 'pending' waits for the mail server (a first try, or the
 * next try after a failure); 'sending' is being handed over right now; 'sent' was taken by the
 * mail server; 'failed' will not be tried again on its own (the reason is in lastError).
 */
export const MAIL_STATUSES = ['pending', 'sending', 'sent', 'failed'] as const
export type MailStatus = (typeof MAIL_STATUSES)[number]

export const outboxQuery = z.object({ status: z.enum(MAIL_STATUSES).optional() })

export interface MailItem {
  id: number
  to: string
  subject: string
  /** What the mail is: session_invitation, session_reminder, staff_invite, password_reset, … */
  kind: string
  status: MailStatus
  attempts: number
  /** Tries before a mail of no session is given up; null for a session's mail, which is tried
   * for as long as its session is open. */
  maxAttempts: number | null
  lastError: string | null
  createdAt: string
  sentAt: string | null
  nextAttemptAt: string | null
  sessionId: number | null
  messageId: string | null
}

export interface CaughtMail {
  id: number
  /** The Message-ID header; the local mail catcher keeps one copy per id. */
  messageId: string | null
  receivedAt: string
  from: string
  to: string
  subject: string
  text: string
  html: string
}
