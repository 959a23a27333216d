/*
 * What every change to clips shares: the dependencies clip storage needs, the queue that runs
 * changes to matched sets one at a time, and the helper that re-balances sets around a write.
 */
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import type { Clock } from '../clock'
import { mediaFolders, removeMedia, type MediaFolders } from './storage'
import { discardChanges, renderChanges, replacedFiles, type RenditionChange } from './renditions'
import { loadSetMembers, renditionColumns, type SetKey, type SetMember } from './setMembers'
import type { ResolvedFields } from './fields'
import type { WorkerPool } from '../workers/pool'

/** What clip storage needs; the demo seed builds it without an HTTP app. */
export interface ClipDeps {
  knex: Knex
  folders: MediaFolders
  clock: Clock
  /** Where decoding, measuring and rendition writing run; on this thread when absent. */
  pool?: WorkerPool
}

export const clipDeps = (ctx: AppContext): ClipDeps => ({
  knex: ctx.knex,
  folders: mediaFolders(ctx.config.mediaDir),
  clock: ctx.clock,
  pool: ctx.pool,
})

// Set gains depend on every member of a set, so changes to sets run one at a time.
const queues = new WeakMap<Knex, Promise<unknown>>()
export function serialised<T>(knex: Knex, work: () => Promise<T>): Promise<T> {
  const previous = queues.get(knex) ?? Promise.resolve()
  const next = previous.catch(() => undefined).then(work)
  queues.set(knex, next)
  return next
}

export const keyOf = (f: ResolvedFields): SetKey => ({
  excerptId: f.excerptId,
  performerCode: f.performerCode,
  instrumentCode: f.instrumentCode,
})

/**
 * Brings the sets named by `keys` to their one format and level (with `extra` members joining
 * and `excludeIds` leaving), then runs `write` in the same transaction as the rendition updates.
 * New renditions are removed if anything fails; replaced ones only once the transaction has
 * committed.
 */
export async function withBalancedSets<T>(
  deps: ClipDeps,
  keys: SetKey[],
  change: { extra?: SetMember[]; excludeIds?: number[] },
  write: (trx: Knex.Transaction, changes: RenditionChange[]) => Promise<T>,
): Promise<T> {
  const existing = await loadSetMembers(deps.knex, keys, change.excludeIds)
  const changes = await renderChanges(
    deps.folders,
    [...existing, ...(change.extra ?? [])],
    deps.pool,
  )
  let result: T
  try {
    result = await deps.knex.transaction(async (trx) => {
      const now = deps.clock.now().toISOString()
      for (const c of changes) {
        if (c.member.clipId === null) continue
        await trx('clips')
          .where({ id: c.member.clipId })
          .update({
            rendition_file: c.file,
            rendition_gain_db: c.gainDb,
            ...renditionColumns(c.facts),
            updated_at: now,
          })
      }
      return write(trx, changes)
    })
  } catch (err) {
    await discardChanges(deps.folders, changes)
    throw err
  }
  await removeMedia(replacedFiles(deps.folders, changes))
  return result
}
