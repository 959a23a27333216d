/*
 * The trials of a listening session wait for the headphone check: the level step and every
 * answer are refused until the check is finished, that is passed, or failed at the last attempt
 * allowed (the player then goes on, flagged). A player who never posts the check would
 * otherwise be counted as "not done" and slip past it. Answers stored before this rule stay as
 * they are and are read as before; only new saves wait. Play-tests have no check.
 */
import type { Knex } from 'knex'
import { conflict } from '../errors'
import { syncRead, type SyncDb } from '../db/syncTransaction'
import type { SessionRow } from '../sessions/rows'
import { hasHeadphoneCheck, isFinished, statusOf } from './headphoneRecord'

/** What the player is told: what to do, and nothing of where their check stands. */
export const HEADPHONE_FIRST = 'Finish the headphone check first: it takes about two minutes.'

// The two figures statusOf needs, over the scored attempts only (headphoneRecord.ts isScored),
// read on the (invitation_id, attempt) index: one small read on the busiest path.
const STANDING_SQL =
  'select coalesce(max(passed), 0) as passed, coalesce(max(attempt), 0) as attempts ' +
  'from headphone_checks where invitation_id = ? ' +
  'and correct is not null and trials is not null and at is not null'

/**
 * Refuses with 409 until the check is finished. Read outside the writing transaction: a check
 * only ever moves towards finished, so what this read saw cannot be undone before the write.
 */
export async function assertHeadphoneFinished(
  knex: Knex,
  session: Pick<SessionRow, 'format'>,
  invitationId: number,
): Promise<void> {
  if (!hasHeadphoneCheck(session.format)) return
  assertStandingFinished(await syncRead(knex, (db) => readStanding(db, invitationId)))
}

export interface HeadphoneStanding {
  passed: number | null
  attempts: number | null
}

/** The standing alone, for a caller that reads it beside other rows in one go. */
export const readStanding = (db: SyncDb, invitationId: number) =>
  db.get<HeadphoneStanding>(STANDING_SQL, invitationId)

export function assertStandingFinished(standing: HeadphoneStanding | undefined): void {
  const status = statusOf(Boolean(standing?.passed), Number(standing?.attempts ?? 0))
  if (!isFinished(status)) throw conflict(HEADPHONE_FIRST)
}
