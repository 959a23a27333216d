import type { Knex } from 'knex'
import { createKnex } from '../db/knex'
import { computeSessionFindings } from '../findings/service'
import type { Subgroup } from '../findings/summary'
import type { SessionFindings } from '../../shared/schemas/findings'

// One connection per database file for the life of the thread: opening SQLite and preparing
// statements afresh for every request would cost more than the reading.
const connections = new Map<string, Knex>()

function connectionFor(databaseFile: string): Knex {
  let knex = connections.get(databaseFile)
  if (!knex) {
    knex = createKnex(databaseFile)
    connections.set(databaseFile, knex)
  }
  return knex
}

/** The findings page of one session and subgroup, read from the database file in this thread. */
export async function findingsTask(
  databaseFile: string,
  sessionId: number,
  group: Subgroup,
): Promise<SessionFindings> {
  return (await computeSessionFindings(connectionFor(databaseFile), sessionId, group)).findings
}
