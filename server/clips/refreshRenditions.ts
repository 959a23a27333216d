/*
 * Renditions written before every matched set shared one format and a measured level are
 * re-made under that rule. It needs the media folder, so it runs when the app starts (see
 * server/index.ts), not in a migration; each set goes through the set queue on its own, so
 * uploads made meanwhile wait for one set at most.
 */
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { chooseSetFormat, LEVEL_TOLERANCE_LU, sameSetFormat } from '../audio/index.ts'
import { clipDeps, serialised, withBalancedSets, type ClipDeps } from './balance'
import { renditionOfRow, setKeyId, sourceOfRow, type MemberRow, type SetKey } from './setMembers'

interface KeyedRow extends MemberRow {
  excerpt_id: number
  performer_code: string
  instrument_code: string
}

/**
 * Sets with a rendition that lacks its facts, is not in the format the set's takes call for,
 * or disagrees with its set-mates in format or level.
 */
export async function setsNeedingRefresh(knex: Knex): Promise<SetKey[]> {
  const rows: KeyedRow[] = await knex('clips').orderBy('id')
  const sets = new Map<string, { key: SetKey; rows: KeyedRow[] }>()
  for (const r of rows) {
    const key = {
      excerptId: r.excerpt_id,
      performerCode: r.performer_code,
      instrumentCode: r.instrument_code,
    }
    const entry = sets.get(setKeyId(key)) ?? { key, rows: [] }
    entry.rows.push(r)
    sets.set(setKeyId(key), entry)
  }
  return [...sets.values()]
    .filter(({ rows }) => {
      const format = chooseSetFormat(rows.map(sourceOfRow))
      const facts = rows.map(renditionOfRow)
      if (facts.some((f) => f === null || !sameSetFormat(f.format, format))) return true
      const levels = facts.map((f) => f!.loudnessLufs)
      return Math.max(...levels) - Math.min(...levels) > LEVEL_TOLERANCE_LU
    })
    .map((s) => s.key)
}

export interface RefreshResult {
  refreshed: number
  failed: { key: SetKey; message: string }[]
}

/**
 * Re-renders every set that needs it, one at a time. A set that fails (an original missing
 * from the media folder, say) is reported and left as it was; the others still go ahead.
 * Stops between sets once `signal` is aborted.
 */
export async function refreshRenditions(
  deps: ClipDeps,
  signal?: AbortSignal,
): Promise<RefreshResult> {
  const result: RefreshResult = { refreshed: 0, failed: [] }
  for (const key of await setsNeedingRefresh(deps.knex)) {
    if (signal?.aborted) break
    try {
      await serialised(deps.knex, () => withBalancedSets(deps, [key], {}, async () => undefined))
      result.refreshed++
    } catch (err) {
      result.failed.push({ key, message: err instanceof Error ? err.message : String(err) })
    }
  }
  return result
}

/** The start-up run, with its outcome in the log. */
export async function refreshRenditionsAtStart(
  ctx: AppContext,
  signal?: AbortSignal,
): Promise<void> {
  const started = Date.now()
  const { refreshed, failed } = await refreshRenditions(clipDeps(ctx), signal)
  if (refreshed > 0)
    ctx.logger.info(
      `Renditions: ${refreshed} matched set${refreshed === 1 ? '' : 's'} brought to one format and level (${Date.now() - started} ms)`,
    )
  for (const f of failed)
    ctx.logger.warn(
      `Renditions of the set of excerpt ${f.key.excerptId}, ${f.key.performerCode}, ${f.key.instrumentCode} could not be re-made: ${f.message}`,
    )
}
