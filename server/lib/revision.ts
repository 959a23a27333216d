/*
 * Saves that hold to the revision an edit form was loaded at. Without it two people saving
 * the same row both succeed and the first one's change silently disappears; with it the
 * second save is a 409 naming the revision the row is at now, and nothing is written.
 */
import type { Knex } from 'knex'
import { notFound, staleRevision } from '../errors'

type Editable = 'sessions' | 'recipes' | 'clips' | 'players'

/** What the person reads: "Someone saved this session after you opened it…". */
const WHAT: Record<Editable, string> = {
  sessions: 'session',
  recipes: 'recipe',
  clips: 'clip',
  players: 'player',
}

/** Moves a row's revision on; every write that changes an editable row includes it. */
export const nextRevision = (db: Knex) => ({ revision: db.raw('revision + 1') })

/** Refuses early, before any costly check or measure, a form loaded at an older revision. */
export function assertRevision(table: Editable, row: { revision: number }, given: number) {
  if (row.revision !== given) throw staleRevision(WHAT[table], row.revision)
}

/**
 * Writes `changes` only if the row is still at `revision`, moving it on by one. Run it inside
 * the change's transaction, so the audit entry and the rest of the change go with it or not.
 */
export async function updateAtRevision(
  trx: Knex,
  table: Editable,
  id: number,
  revision: number,
  changes: Record<string, unknown>,
): Promise<void> {
  const updated = await trx(table)
    .where({ id, revision })
    .update({ ...changes, ...nextRevision(trx) })
  if (updated > 0) return
  const row: { revision: number } | undefined = await trx(table).where({ id }).first('revision')
  if (!row) throw notFound(WHAT[table].replace(/^./, (c) => c.toUpperCase()))
  throw staleRevision(WHAT[table], row.revision)
}
