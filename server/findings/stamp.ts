import type { Knex } from 'knex'

/**
 * Where a session's findings stand: its study's counter and the panel-wide one, both moved by
 * triggers (migrations/20261203000300_findings_stamps.ts) on every change the findings read.
 * Two equal stamps mean equal findings; null when there is no such session.
 */
export async function findingsStamp(db: Knex, sessionId: number): Promise<string | null> {
  const row: { study: number | null; panel: number | null } | undefined = await db('sessions as s')
    .where('s.id', sessionId)
    .first(
      db.raw(
        '(SELECT stamp FROM findings_stamps WHERE study_id = coalesce(s.parent_session_id, s.id)) AS study',
      ),
      db.raw('(SELECT stamp FROM findings_stamps WHERE study_id = 0) AS panel'),
    )
  return row ? `${row.study ?? 0}.${row.panel ?? 0}` : null
}
