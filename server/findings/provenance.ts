import type { Knex } from 'knex'
import type { FindingsProvenance } from '../../shared/schemas/findings'
import type { FindingsData } from './data'

/** Audited changes that can alter a session's findings (exclusions, design, open and close). */
export const FINDINGS_CHANGES = [
  'findings.player_excluded',
  'findings.player_included',
  'session.updated',
  'session.opened',
  'session.closed',
] as const

/**
 * What the findings were computed from: the answers counted, the exclusions, and when the last
 * answer came in or the last change that can alter them was made, so a reader can tell whether
 * two printouts can differ.
 */
export async function provenanceOf(db: Knex, data: FindingsData): Promise<FindingsProvenance> {
  const last: { action: string; at: string } | undefined = await db('audit_log')
    .where({ target_type: 'session', target_id: String(data.session.id) })
    .whereIn('action', FINDINGS_CHANGES)
    .orderBy('at', 'desc')
    .orderBy('id', 'desc')
    .first('action', 'at')
  return {
    answers: data.answers,
    players: data.players.filter((p) => p.answered > 0).length,
    excluded: data.players.filter((p) => p.exclusionReason !== null).length,
    headphoneExcluded: data.players.filter((p) => p.excludedBy === 'headphone').length,
    lastAnswerAt: data.lastAnswerAt,
    lastChange: last ? { action: last.action, at: last.at } : null,
  }
}
