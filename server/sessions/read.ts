/*
 * Reading sessions: the list of summaries, and one session in full with its design reviewed
 * again on each read, so its warnings are current.
 */
import type { Knex } from 'knex'
import { notFound } from '../errors'
import { reviewDesign } from './designReview'
import {
  answersCount,
  designOf,
  playerWordsOf,
  summaryQuery,
  toSummary,
  type SessionRow,
  type SummaryRow,
} from './rows'
import type { SessionDetail, SessionSummary } from '../../shared/schemas/sessions'

export async function listSessions(knex: Knex): Promise<SessionSummary[]> {
  const rows: SummaryRow[] = await summaryQuery(knex)
    .orderBy('s.created_at', 'desc')
    .orderBy('s.id', 'desc')
  return rows.map(toSummary)
}

export async function getSession(knex: Knex, id: number, now: Date): Promise<SessionDetail> {
  const s: SummaryRow | undefined = await summaryQuery(knex).where('s.id', id).first()
  if (!s) throw notFound('Session')
  const design = designOf(s)
  // A draft's passed deadline is worth a warning; a running session's is simply its end.
  const review = await reviewDesign(
    knex,
    { ...design, deadline: s.deadline, playerWords: playerWordsOf(s) },
    null,
  )
  const warnings = [...Object.values(review.errors).flat(), ...review.warnings]
  if (s.status === 'draft' && s.deadline < now.toISOString().slice(0, 10))
    warnings.push('The deadline has passed: choose a new one before opening')
  const answers = await answersCount(knex, id)
  const rootId = s.parent_session_id ?? s.id
  const family: Pick<SessionRow, 'id' | 'time_point_label' | 'status'>[] = await knex('sessions')
    .where({ id: rootId })
    .orWhere({ parent_session_id: rootId })
    .orderBy('created_at')
    .orderBy('id')
    .select('id', 'time_point_label', 'status')
  return {
    ...toSummary(s),
    purpose: s.purpose,
    recipeIds: design.recipeIds,
    clipSets: review.clipSets,
    attributes: design.attributes,
    duplicates: s.duplicates,
    allowNoPreference: Boolean(s.allow_no_preference),
    adjustment: s.adjustment ?? 'holm',
    targetDifference: s.target_difference ?? null,
    playerTitle: s.player_title,
    playerMessage: s.player_message,
    reminderDaysBefore: s.reminder_days_before,
    seed: s.seed,
    locked: answers > 0,
    answersCount: answers,
    trialCount: review.trialCount,
    warnings,
    recordProblem: s.record_problem ?? null,
    sameTakeWarnings: review.sameTake,
    sameTakeAccepted: s.same_take_accepted_at
      ? { at: s.same_take_accepted_at, by: s.same_take_accepted_by ?? null }
      : null,
    recipes: review.recipes,
    timePoints: family.map((f) => ({ id: f.id, label: f.time_point_label, status: f.status })),
    openedAt: s.opened_at,
    closedAt: s.closed_at,
    revision: s.revision,
  }
}
