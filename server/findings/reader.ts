import type { AppContext } from '../context'
import { AppError, notFound } from '../errors'
import type { SessionFindings } from '../../shared/schemas/findings'
import { findingsOutcome, type FindingsOutcome } from '../workers/findingsTask'
import { createFindingsCache } from './cache'
import { findingsStamp } from './stamp'
import type { Subgroup } from './summary'

export interface FindingsReader {
  /** The findings page as the JSON text the route sends. */
  json(sessionId: number, group?: Subgroup): Promise<string>
  read(sessionId: number, group?: Subgroup): Promise<SessionFindings>
  /** Pages asked for, and how many of them had to be computed. */
  counts(): { asked: number; computed: number }
}

const readers = new WeakMap<AppContext, FindingsReader>()

/** The one reader (and cache) of an app: routes and metrics share it. */
export function findingsReader(ctx: AppContext): FindingsReader {
  let reader = readers.get(ctx)
  if (!reader) readers.set(ctx, (reader = createFindingsReader(ctx)))
  return reader
}

/**
 * Findings as staff read them: from the cache while the session's stamp stands, otherwise
 * computed in a worker thread from the database file, so a 1,000-player session never holds
 * up the players saving answers. Tests on an in-memory database compute inline.
 */
function createFindingsReader(ctx: AppContext): FindingsReader {
  const cache = createFindingsCache()
  let asked = 0
  let computed = 0
  const threaded = ctx.pool.threaded && ctx.config.databaseFile !== ':memory:'

  const compute = (sessionId: number, group: Subgroup): Promise<FindingsOutcome> =>
    threaded
      ? ctx.pool.run('findings', ctx.config.databaseFile, sessionId, group)
      : findingsOutcome(ctx.knex, sessionId, group)

  async function json(sessionId: number, group: Subgroup = {}): Promise<string> {
    // The stamp is read before computing: a change during the computation moves it on, so a
    // page that may have missed that change is never served under the newer stamp.
    const stamp = await findingsStamp(ctx.knex, sessionId)
    if (stamp === null) throw notFound('Session')
    const key = `${sessionId}|${group.instrument ?? ''}|${group.level ?? ''}`
    asked++
    return cache.get(key, stamp, async () => {
      computed++
      const outcome = await compute(sessionId, group)
      if (!outcome.ok) throw new AppError(outcome.code, outcome.message, outcome.extra)
      return outcome.body
    })
  }

  return {
    json,
    read: async (sessionId, group) => JSON.parse(await json(sessionId, group)) as SessionFindings,
    counts: () => ({ asked, computed }),
  }
}
