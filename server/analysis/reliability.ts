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
  // Whole-number indices for players, recipes, attributes and items, and flat arrays over
  // them: on a large panel, maps of maps and a key string per rating cost more than the
  // statistics. Ids are compared as text, as everywhere in the engine.
  const playerIndex = new Map<Id, number>()
  const playerIds: Id[] = []
  const recipeIndex = new Map<string, number>()
  const attributeIndex = new Map<string, number>()
  const attributeIds: Id[] = []
  const itemIndex = new Map<string, number>()
  const indexOf = (m: Map<string, number>, key: string) => {
    let i = m.get(key)
    if (i === undefined) m.set(key, (i = m.size))
    return i
  }
  // One entry per usable rating, in typed arrays: no object per rating for the collector.
  const n = ratings.length
  const ps = new Int32Array(n)
  const rs = new Int32Array(n)
  const as = new Int32Array(n)
  const is = new Int32Array(n)
  const values = new Float64Array(n)
  let kept = 0
  for (const r of ratings) {
    if (typeof r.value !== 'number' || !Number.isFinite(r.value)) continue
    let p = playerIndex.get(r.player)
    if (p === undefined) {
      playerIndex.set(r.player, (p = playerIds.length))
      playerIds.push(r.player)
    }
    const attribute = String(r.attribute)
    let a = attributeIndex.get(attribute)
    if (a === undefined) {
      attributeIndex.set(attribute, (a = attributeIds.length))
      attributeIds.push(r.attribute)
    }
    ps[kept] = p
    rs[kept] = indexOf(recipeIndex, String(r.recipe))
    as[kept] = a
    is[kept] = indexOf(itemIndex, String(r.item ?? r.clip ?? ''))
    values[kept] = r.value
    kept++
  }
  const P = playerIds.length
  const R = recipeIndex.size
  const A = attributeIds.length
  const I = itemIndex.size
  // Cell sums per player × recipe × attribute, and the panel's sum of cell means per cell.
  const cellSum = new Float64Array(P * R * A)
  const cellCount = new Uint32Array(P * R * A)
  // Repeats of one item (player × item × recipe × attribute): each rating links back to the
  // previous rating of the same item, so every pair is found without a list per item.
  const last = new Map<number, number>()
  const previous = new Int32Array(kept).fill(-1)
  const pairsByPlayer = new Map<number, [number, number][]>()
  for (let k = 0; k < kept; k++) {
    const cell = (ps[k] * R + rs[k]) * A + as[k]
    cellSum[cell] += values[k]
    cellCount[cell]++
    const key = ((ps[k] * I + is[k]) * R + rs[k]) * A + as[k]
    const before = last.get(key)
    last.set(key, k)
    if (before === undefined) continue
    previous[k] = before
    let list = pairsByPlayer.get(ps[k])
    if (!list) pairsByPlayer.set(ps[k], (list = []))
    // Every pair of repeats, earlier first: with the usual two repeats, one pair per item.
    const earlier: number[] = []
    for (let j = before; j !== -1; j = previous[j]) earlier.push(j)
    for (let e = earlier.length - 1; e >= 0; e--) list.push([values[earlier[e]], values[k]])
  }
  const panelSum = new Float64Array(R * A)
  const panelCount = new Uint32Array(R * A)
  for (let p = 0; p < P; p++)
    for (let c = 0; c < R * A; c++) {
      const cell = p * R * A + c
      if (cellCount[cell] === 0) continue
      panelSum[c] += cellSum[cell] / cellCount[cell]
      panelCount[c]++
    }

  const dims = { R, A, attributeIds }

  const players: PlayerReliability[] = []
  for (let index = 0; index < P; index++) {
    const player = playerIds[index]
    const pairs = pairsByPlayer.get(index) ?? []
    const misses = pairs.filter(([a, b]) => Math.abs(a - b) > tolerance).length
    const enough = pairs.length >= minPairs
    const missShare = pairs.length > 0 ? misses / pairs.length : null
    const mad =
      pairs.length > 0 ? pairs.reduce((s, [a, b]) => s + Math.abs(a - b), 0) / pairs.length : null
    const agreement = leaveOneOut(index, cellSum, cellCount, panelSum, panelCount, dims)
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

function leaveOneOut(
  player: number,
  cellSum: Float64Array,
  cellCount: Uint32Array,
  panelSum: Float64Array,
  panelCount: Uint32Array,
  { R, A }: { R: number; A: number; attributeIds: Id[] },
): { rho: number | null; cells: number } {
  // Centred within each attribute: attributes sit at different heights on the scale, and that
  // offset alone would make any player look in tune with the panel.
  const own: number[] = []
  const rest: number[] = []
  for (let a = 0; a < A; a++) {
    const groupOwn: number[] = []
    const groupRest: number[] = []
    for (let r = 0; r < R; r++) {
      const c = r * A + a
      const cell = player * R * A + c
      if (cellCount[cell] === 0 || panelCount[c] < 2) continue
      const mine = cellSum[cell] / cellCount[cell]
      groupOwn.push(mine)
      groupRest.push((panelSum[c] - mine) / (panelCount[c] - 1))
    }
    if (groupOwn.length < 2) continue
    const mo = groupOwn.reduce((x, y) => x + y, 0) / groupOwn.length
    const mr = groupRest.reduce((x, y) => x + y, 0) / groupRest.length
    for (let i = 0; i < groupOwn.length; i++) {
      own.push(groupOwn[i] - mo)
      rest.push(groupRest[i] - mr)
    }
  }
  return { rho: own.length >= 3 ? spearmanRho(own, rest) : null, cells: own.length }
}
