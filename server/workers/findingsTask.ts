import type { Knex } from 'knex'
import { createKnex } from '../db/knex'
import { AppError } from '../errors'
import { computeSessionFindings } from '../findings/service'
import type { Subgroup } from '../findings/summary'
import type { ErrorCode } from '../../shared/types/api'

// One connection per database file for the life of the thread: opening SQLite and preparing
// statements afresh for every request would cost more than the reading.
const connections = new Map<string, Knex>()

export function connectionFor(databaseFile: string): Knex {
  let knex = connections.get(databaseFile)
  if (!knex) {
    knex = createKnex(databaseFile, { readOnly: true })
    connections.set(databaseFile, knex)
  }
  return knex
}

/** The page as JSON text, or the service's own error: an AppError does not survive a thread. */
export type FindingsOutcome =
  | { ok: true; body: string }
  | { ok: false; code: ErrorCode; message: string; extra: AppError['extra'] }

/** Computes one findings page, reading in one transaction so every query sees one moment. */
export async function findingsOutcome(
  knex: Knex,
  sessionId: number,
  group: Subgroup,
): Promise<FindingsOutcome> {
  try {
    const { findings } = await knex.transaction((trx) =>
      computeSessionFindings(trx, sessionId, group),
    )
    return { ok: true, body: JSON.stringify(findings) }
  } catch (err) {
    if (err instanceof AppError)
      return { ok: false, code: err.code, message: err.message, extra: err.extra }
    throw err
  }
}

/** The findings page of one session and subgroup, read from the database file in this thread. */
export function findingsTask(
  databaseFile: string,
  sessionId: number,
  group: Subgroup,
): Promise<FindingsOutcome> {
  return findingsOutcome(connectionFor(databaseFile), sessionId, group)
}
