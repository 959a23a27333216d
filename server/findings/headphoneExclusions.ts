/*
 * Players whose headphone check failed are left out of a listening session's findings by
 * default: the recordings may not have reached them as made. Unlike an analyst's exclusion this
 * needs no row; it follows from the stored checks. An analyst may take such a player back in,
 * which is kept as a row here with its reason (and audited by exclusions.ts), and undone by
 * deleting the row, which lets the rule apply again.
 */
import type { Knex } from 'knex'
import type { SessionRow } from '../sessions/rows'
import {
  checkRows,
  hasHeadphoneCheck,
  recordOf,
  sessionHeadphoneRecords,
  type HeadphoneRecord,
} from '../player/headphoneRecord'

/** The reason shown beside every player the rule leaves out. */
export const HEADPHONE_EXCLUSION_REASON = 'headphone check failed'

/**
 * A check still open for a retry counts as failed too: the answers given so far were given
 * after a failed check.
 */
const failedCheck = (r: HeadphoneRecord) => r.status === 'failed' || r.status === 'retry'

export interface HeadphoneScreening {
  /** Invitations whose check failed: every attempt made failed, none passed. */
  failed: Set<number>
  /** Players an analyst took back in despite the failed check. */
  includedBack: Set<number>
}

/** Failed-check invitations and taken-back players of one session; a play-test has no check. */
export async function headphoneScreening(
  db: Knex,
  session: SessionRow,
): Promise<HeadphoneScreening> {
  if (!hasHeadphoneCheck(session.format)) return { failed: new Set(), includedBack: new Set() }
  const records = await sessionHeadphoneRecords(db, session.id)
  const failed = new Set([...records].filter(([, r]) => failedCheck(r)).map(([id]) => id))
  const back: { player_id: number }[] =
    failed.size === 0
      ? []
      : await db('headphone_inclusions').where({ session_id: session.id }).select('player_id')
  return { failed, includedBack: new Set(back.map((b) => b.player_id)) }
}

/** One player's standing under the rule: whether their check failed, whether they were taken back. */
export async function screeningOf(
  db: Knex,
  session: SessionRow,
  playerId: number,
): Promise<{ failed: boolean; includedBack: boolean }> {
  const inv: { id: number } | undefined = await db('invitations')
    .where({ session_id: session.id, player_id: playerId })
    .whereNull('revoked_at')
    .first('id')
  const failed =
    inv !== undefined &&
    hasHeadphoneCheck(session.format) &&
    failedCheck(recordOf(await checkRows(db, inv.id)))
  const back = await db('headphone_inclusions')
    .where({ session_id: session.id, player_id: playerId })
    .first('id')
  return { failed, includedBack: back !== undefined }
}
