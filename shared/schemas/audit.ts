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

export interface MailItem {
  id: number
  to: string
  subject: string
  status: 'pending' | 'sent' | 'failed'
  attempts: number
  lastError: string | null
  createdAt: string
  sentAt: string | null
  nextAttemptAt: string | null
}

export interface CaughtMail {
  id: number
  receivedAt: string
  from: string
  to: string
  subject: string
  text: string
  html: string
}
