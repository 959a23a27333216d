import type { Knex } from 'knex'
import type { AuditEntry, ListAuditQuery } from '../../shared/schemas/audit'
import { whereContains } from '../db/like'

export interface Actor {
  userId: number | null
  email: string | null
  /** For mail wording ("Ada has invited you"); not stored in the audit log. */
  name?: string | null
  ip?: string | null
}

export interface AuditEvent {
  action: string
  targetType?: string
  targetId?: string | number
  details?: Record<string, unknown>
}

/** Anything shaped like an address (RFC 5322 addr-spec, loosely): never copied into details. */
const ADDRESS = /[^\s@"'<>(),;:]+@[^\s@"'<>(),;:]+\.[^\s@"'<>(),;:]+/g

/**
 * Details are free text that the audit page shows and searches; the actor's address has its
 * own column, and the target its id. An address that slips into details anyway is replaced,
 * so deleting a person on request does not leave their address behind in old entries.
 */
function withoutAddresses(details: Record<string, unknown>): string {
  return JSON.stringify(details, (_key, value: unknown) =>
    typeof value === 'string' ? value.replace(ADDRESS, '[address]') : value,
  )
}

/** Writes one audit row; pass the transaction so the record and the change land together. */
export async function recordAudit(
  db: Knex,
  at: Date,
  actor: Actor,
  event: AuditEvent,
): Promise<void> {
  await db('audit_log').insert({
    at: at.toISOString(),
    actor_user_id: actor.userId,
    actor_email: actor.email,
    action: event.action,
    target_type: event.targetType ?? null,
    target_id: event.targetId === undefined ? null : String(event.targetId),
    details: withoutAddresses(event.details ?? {}),
    ip: actor.ip ?? null,
  })
}

interface AuditRow {
  id: number
  at: string
  actor_email: string | null
  action: string
  target_type: string | null
  target_id: string | null
  details: string
  ip: string | null
}

export async function listAudit(
  knex: Knex,
  query: ListAuditQuery,
): Promise<{ total: number; entries: AuditEntry[] }> {
  const q = knex<AuditRow>('audit_log')
  if (query.action) q.where('action', 'like', `${query.action}%`)
  if (query.actor) whereContains(q, 'actor_email', query.actor)
  if (query.q) {
    const text = query.q
    q.where((w) => {
      for (const [i, column] of ['details', 'target_id', 'action'].entries())
        whereContains(w, column, text, i > 0)
    })
  }
  if (query.from) q.where('at', '>=', `${query.from}T00:00:00.000Z`)
  if (query.to) q.where('at', '<=', `${query.to}T23:59:59.999Z`)
  const [{ n }] = (await q.clone().count({ n: '*' })) as { n: number }[]
  const rows: AuditRow[] = await q
    .orderBy('id', 'desc')
    .limit(query.limit)
    .offset(query.offset)
    .select('id', 'at', 'actor_email', 'action', 'target_type', 'target_id', 'details', 'ip')
  return {
    total: Number(n),
    entries: rows.map((r) => ({
      id: r.id,
      at: r.at,
      actorEmail: r.actor_email,
      action: r.action,
      targetType: r.target_type,
      targetId: r.target_id,
      details: JSON.parse(r.details) as Record<string, unknown>,
      ip: r.ip,
    })),
  }
}

export async function auditActions(knex: Knex): Promise<string[]> {
  const rows: { action: string }[] = await knex('audit_log').distinct('action').orderBy('action')
  return rows.map((r) => r.action)
}
