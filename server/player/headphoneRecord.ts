/*
 * The headphone check as stored: one row per attempt, dealt and scored by the server. This file
 * reads the rows and says where an invitation's check stands; the player's state, the staff's
 * tracking and the findings all read it here, so they cannot disagree.
 */
import type { Knex } from 'knex'
import { formatOf } from '../formats/index.ts'
import type { SessionFormat } from '../../shared/schemas/sessions'
import type { PlayerHeadphone } from '../../shared/schemas/rating'
import { HEADPHONE_RETRY, type HeadphoneStatus, type ToneKind } from '../../shared/headphoneCheck'

export interface HeadphoneCheckRow {
  id: number
  invitation_id: number
  attempt: number
  dealt: string | null
  responses: string | null
  correct: number | null
  trials: number | null
  passed: number | boolean | null
  dealt_at: string | null
  at: string | null
}

export type ScoredCheck = HeadphoneCheckRow & { correct: number; trials: number; at: string }

/** Where one invitation's check stands, from its rows. */
export interface HeadphoneRecord {
  /** Null before the first attempt is scored. */
  status: HeadphoneStatus | null
  /** The highest attempt number scored (a result kept from before may carry a later number). */
  attempts: number
  latest: ScoredCheck | null
  /** A dealt attempt still waiting for its answers. */
  pending: HeadphoneCheckRow | null
}

/** Play-tests are played on the player's own instrument, not listened to: no check. */
export const hasHeadphoneCheck = (format: SessionFormat) => formatOf(format).clipSets !== 'none'

export const isScored = (r: HeadphoneCheckRow): r is ScoredCheck =>
  r.correct !== null && r.trials !== null && r.at !== null

export const dealtTones = (r: HeadphoneCheckRow) =>
  JSON.parse(r.dealt ?? '[]') as [ToneKind, ToneKind, ToneKind][]

/**
 * A passed attempt passes; otherwise the allowed attempts, all failed, flag the invitation.
 * `attempts` is the highest scored attempt number, 0 before any is scored. The answer path
 * reads these two figures in one query (headphoneGate.ts), so the rule lives here once.
 */
export function statusOf(anyPassed: boolean, attempts: number): HeadphoneStatus | null {
  if (attempts <= 0) return null
  if (anyPassed) return 'passed'
  return attempts >= HEADPHONE_RETRY.attempts ? 'failed' : 'retry'
}

/** Finished: passed, or failed at the last attempt allowed. Only then do the trials open. */
export const isFinished = (status: HeadphoneStatus | null) =>
  status === 'passed' || status === 'failed'

/** Where one invitation's check stands, from its rows. */
export function recordOf(rows: HeadphoneCheckRow[]): HeadphoneRecord {
  const scored = rows.filter(isScored).sort((a, b) => a.attempt - b.attempt)
  const latest = scored.at(-1) ?? null
  const attempts = latest?.attempt ?? 0
  return {
    status: statusOf(
      scored.some((r) => Boolean(r.passed)),
      attempts,
    ),
    attempts,
    latest,
    pending: rows.find((r) => !isScored(r)) ?? null,
  }
}

/** When another attempt may start after a failure: the pause runs from the failed answer. */
export function retryAllowedAt(record: HeadphoneRecord): Date | null {
  if (record.status !== 'retry' || !record.latest) return null
  return new Date(Date.parse(record.latest.at) + HEADPHONE_RETRY.pauseSeconds * 1000)
}

export async function checkRows(db: Knex, invitationId: number): Promise<HeadphoneCheckRow[]> {
  return db('headphone_checks').where({ invitation_id: invitationId }).orderBy('attempt')
}

/** What the player is told of their own check: the latest score and when they may retry. */
export function playerHeadphoneOf(record: HeadphoneRecord, now: Date): PlayerHeadphone | null {
  if (!record.status || !record.latest) return null
  const allowedAt = retryAllowedAt(record)
  return {
    status: record.status,
    correct: record.latest.correct,
    trials: record.latest.trials,
    passed: record.status === 'passed',
    attempts: record.attempts,
    retryInSeconds: allowedAt
      ? Math.max(0, Math.ceil((allowedAt.getTime() - now.getTime()) / 1000))
      : null,
  }
}

/** The records of a session's invitations; an invitation with no rows is not in the map. */
export async function sessionHeadphoneRecords(
  db: Knex,
  sessionId: number,
): Promise<Map<number, HeadphoneRecord>> {
  const rows: HeadphoneCheckRow[] = await db('headphone_checks as h')
    .join('invitations as i', 'i.id', 'h.invitation_id')
    .where('i.session_id', sessionId)
    .orderBy(['h.invitation_id', 'h.attempt'])
    .select('h.*')
  const byInvitation = new Map<number, HeadphoneCheckRow[]>()
  for (const r of rows) {
    const list = byInvitation.get(r.invitation_id) ?? []
    list.push(r)
    byInvitation.set(r.invitation_id, list)
  }
  return new Map([...byInvitation].map(([id, list]) => [id, recordOf(list)]))
}
