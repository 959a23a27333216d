import { pearson, spearmanRho } from './correlation.ts'
import type { Id, Rating, Reason } from './types.ts'

export interface ReliabilityOptions {
  /** Points two ratings of the same hidden duplicate may differ before they count as a miss. */
  tolerance?: number
  /** Share of missed duplicates above which a player is flagged. */
  maxMissShare?: number
  /** Fewer duplicate pairs than this cannot judge a player fairly; no flag is raised. */
  minPairs?: number
}

/**
 * Default tolerance: a fifth of the 0–100 scale. A player whose repeat ratings scatter with an
 * SD of about 10 points misses it on roughly 15% of duplicates, so the flag lands on players
 * noisier than that.
 */
export const DUPLICATE_TOLERANCE = 20
export const MAX_MISS_SHARE = 0.15
export const MIN_DUPLICATE_PAIRS = 3

export function reliabilityRule(
  tolerance = DUPLICATE_TOLERANCE,
  maxMissShare = MAX_MISS_SHARE,
  minPairs = MIN_DUPLICATE_PAIRS,
): string {
  return (
    `A player is flagged for exclusion when their two ratings of the same hidden duplicate ` +
    `differ by more than ${tolerance} points on more than ${Math.round(maxMissShare * 100)}% ` +
    `of duplicated items (judged only with at least ${minPairs} duplicated items). Adapted ` +
    `from the assessor post-screening of ITU-R BS.1534-3 §4.1.2, which applies the same 15% ` +
    `limit to a hidden reference. A flag is advice to the analyst: exclusion is their decision ` +
    `and is recorded with a reason.`
  )
}

/** The rule as applied with the defaults, for reports and the findings page. */
export const RELIABILITY_RULE = reliabilityRule()

export interface PlayerReliability {
  player: Id
  /** Pairs of ratings of the same recipe, clip and attribute by this player. */
  duplicatePairs: number
  /** Pairs differing by more than the tolerance. */
  misses: number
  missShare: number | null
  meanAbsoluteDifference: number | null
  /** Pearson r between first and second ratings across duplicated items. */
  duplicateCorrelation: number | null
  /**
   * Spearman rho between the player's recipe means and the rest of the panel's, across
   * recipe × attribute cells (each centred within its attribute).
   */
  panelAgreement: number | null
  panelCells: number
  flagged: boolean
  reason: Reason
}

export interface ReliabilityResult {
  rule: string
  players: PlayerReliability[]
}

export function reliability(
  ratings: readonly Rating[],
  options: ReliabilityOptions = {},
): ReliabilityResult {
  const {
    tolerance = DUPLICATE_TOLERANCE,
    maxMissShare = MAX_MISS_SHARE,
    minPairs = MIN_DUPLICATE_PAIRS,
  } = options
  // Nested maps rather than joined keys: on a large panel, building a key string per rating
  // cost more than the statistics. Ids are compared as text, as everywhere in the engine.
  // Repeats of one item per player (recipe → item → attribute), in the order answered.
  const repeats = new Map<Id, Map<string, Map<string, Map<string, number[]>>>>()
  // Cell means per player (recipe × attribute) and panel totals for the leave-one-out.
  const cells = new Map<Id, Map<string, Map<string, Cell>>>()
  for (const r of ratings) {
    if (typeof r.value !== 'number' || !Number.isFinite(r.value)) continue
    const recipe = String(r.recipe)
    const attribute = String(r.attribute)
    const byItem = child(child(repeats, r.player), recipe)
    child(byItem, String(r.item ?? r.clip ?? ''), attribute, () => []).push(r.value)
    const cell = child(child(cells, r.player), recipe, attribute, () => ({
      attribute: r.attribute,
      sum: 0,
      count: 0,
    }))
    cell.sum += r.value
    cell.count++
  }
  const panel = new Map<string, Map<string, { sum: number; count: number }>>()
  for (const playerCells of cells.values())
    for (const [recipe, byAttribute] of playerCells)
      for (const [attribute, cell] of byAttribute) {
        const total = child(panel, recipe, attribute, () => ({ sum: 0, count: 0 }))
        total.sum += cell.sum / cell.count
        total.count++
      }

  const pairsByPlayer = new Map<Id, [number, number][]>()
  for (const [player, byRecipe] of repeats) {
    const list: [number, number][] = []
    for (const byItem of byRecipe.values())
      for (const byAttribute of byItem.values())
        for (const values of byAttribute.values())
          // Every pair of repeats: with the usual two repeats that is one pair per item.
          for (let i = 0; i < values.length; i++)
            for (let j = i + 1; j < values.length; j++) list.push([values[i], values[j]])
    if (list.length > 0) pairsByPlayer.set(player, list)
  }

  const players: PlayerReliability[] = []
  for (const [player, playerCells] of cells) {
    const pairs = pairsByPlayer.get(player) ?? []
    const misses = pairs.filter(([a, b]) => Math.abs(a - b) > tolerance).length
    const enough = pairs.length >= minPairs
    const missShare = pairs.length > 0 ? misses / pairs.length : null
    const mad =
      pairs.length > 0 ? pairs.reduce((s, [a, b]) => s + Math.abs(a - b), 0) / pairs.length : null
    const agreement = leaveOneOut(playerCells, panel)
    players.push({
      player,
      duplicatePairs: pairs.length,
      misses,
      missShare,
      meanAbsoluteDifference: mad,
      duplicateCorrelation:
        pairs.length >= 3
          ? pearson(
              pairs.map((p) => p[0]),
              pairs.map((p) => p[1]),
            )
          : null,
      panelAgreement: agreement.rho,
      panelCells: agreement.cells,
      flagged: enough && (missShare as number) > maxMissShare,
      reason: enough ? null : 'too few hidden duplicates',
    })
  }
  return { rule: reliabilityRule(tolerance, maxMissShare, minPairs), players }
}

interface Cell {
  attribute: Id
  sum: number
  count: number
}

/** The map under `key` in `m`, made empty (or by `make` at the last level) when missing. */
function child<K, V>(m: Map<K, Map<string, V>>, key: K): Map<string, V>
function child<V>(m: Map<string, Map<string, V>>, key: string, last: string, make: () => V): V
function child(
  m: Map<unknown, Map<string, unknown>>,
  key: unknown,
  last?: string,
  make?: () => unknown,
): unknown {
  let inner = m.get(key)
  if (!inner) m.set(key, (inner = new Map()))
  if (last === undefined) return inner
  let value = inner.get(last)
  if (value === undefined) inner.set(last, (value = make!()))
  return value
}

function leaveOneOut(
  playerCells: Map<string, Map<string, Cell>>,
  panel: Map<string, Map<string, { sum: number; count: number }>>,
): { rho: number | null; cells: number } {
  // Group by attribute so each side can be centred: attributes sit at different heights on
  // the scale, and that offset alone would make any player look in tune with the panel.
  const byAttribute = new Map<Id, { own: number[]; rest: number[] }>()
  for (const [recipe, cellsOfRecipe] of playerCells)
    for (const [attributeKey, cell] of cellsOfRecipe) {
      const total = panel.get(recipe)?.get(attributeKey)
      if (!total || total.count < 2) continue
      const own = cell.sum / cell.count
      const rest = (total.sum - own) / (total.count - 1)
      const group = byAttribute.get(cell.attribute) ?? { own: [], rest: [] }
      group.own.push(own)
      group.rest.push(rest)
      byAttribute.set(cell.attribute, group)
    }
  const own: number[] = []
  const rest: number[] = []
  for (const group of byAttribute.values()) {
    if (group.own.length < 2) continue
    const mo = group.own.reduce((a, b) => a + b, 0) / group.own.length
    const mr = group.rest.reduce((a, b) => a + b, 0) / group.rest.length
    group.own.forEach((v, i) => {
      own.push(v - mo)
      rest.push(group.rest[i] - mr)
    })
  }
  return { rho: own.length >= 3 ? spearmanRho(own, rest) : null, cells: own.length }
}
