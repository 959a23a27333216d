import { spearman } from './correlation.ts'
import { pearsonTest } from './pearsonTest.ts'
import type { Id, Interval, Rating, Reason } from './types.ts'

/** One measured figure of one clip (e.g. spectral centroid, decay time, attack time). */
export interface ClipMeasure {
  clip: Id
  recipe: Id
  measure: string
  value: number
}

export interface MeasureCorrelation {
  measure: string
  attribute: Id
  /** Clips (or recipes) with both a measure and a rating. */
  n: number
  rho: number | null
  p: number | null
  /** Pearson's r beside the rank correlation: a straight-line fit, with its Fisher-z interval. */
  pearsonR: number | null
  pearsonP: number | null
  pearsonCi: Interval | null
  reason: Reason
}

export interface ObjectiveOptions {
  /**
   * 'clip' pairs each clip's measure with that clip's ratings (needs `clip` on ratings);
   * 'recipe' averages both sides per recipe. Default: 'clip' when every rating names a clip.
   */
  level?: 'clip' | 'recipe'
}

function averageBy<T>(items: readonly T[], group: (t: T) => string, value: (t: T) => number) {
  const sums = new Map<string, { sum: number; count: number }>()
  for (const item of items) {
    const v = value(item)
    if (!Number.isFinite(v)) continue
    const k = group(item)
    const s = sums.get(k) ?? { sum: 0, count: 0 }
    s.sum += v
    s.count++
    sums.set(k, s)
  }
  return new Map([...sums].map(([k, s]) => [k, s.sum / s.count]))
}

/** Mean ratings by unit (clip or recipe, as text) and attribute (as text). */
export type PerceivedMeans = Map<string, Map<string, number>>

/**
 * Per unit and attribute, the mean of player means, so a player who heard a clip twice does
 * not count twice. Nested maps rather than joined keys: a large panel has a hundred thousand
 * ratings, and building a key string for each cost more than the correlations.
 */
export function perceivedMeans(
  ratings: readonly Rating[],
  unitOf: (r: Rating) => Id | undefined,
): PerceivedMeans {
  const sums = new Map<string, Map<string, Map<Id, { sum: number; count: number }>>>()
  for (const r of ratings) {
    if (!Number.isFinite(r.value)) continue
    const unit = String(unitOf(r))
    let byAttribute = sums.get(unit)
    if (!byAttribute) sums.set(unit, (byAttribute = new Map()))
    const attribute = String(r.attribute)
    let byPlayer = byAttribute.get(attribute)
    if (!byPlayer) byAttribute.set(attribute, (byPlayer = new Map()))
    const s = byPlayer.get(r.player)
    if (s) {
      s.sum += r.value
      s.count++
    } else byPlayer.set(r.player, { sum: r.value, count: 1 })
  }
  const out: PerceivedMeans = new Map()
  for (const [unit, byAttribute] of sums) {
    const means = new Map<string, number>()
    for (const [attribute, byPlayer] of byAttribute) {
      let total = 0
      for (const s of byPlayer.values()) total += s.sum / s.count
      means.set(attribute, total / byPlayer.size)
    }
    out.set(unit, means)
  }
  return out
}

const levelOf = (ratings: readonly Rating[], options: ObjectiveOptions) =>
  options.level ?? (ratings.length > 0 && ratings.every((r) => r.clip != null) ? 'clip' : 'recipe')

const unitFor =
  (level: 'clip' | 'recipe') =>
  (x: { clip?: Id; recipe: Id }): Id | undefined =>
    level === 'clip' ? x.clip : x.recipe

/** Spearman rho between each measure and each attribute's mean rating, across clips or recipes. */
export function objectiveVsPerceived(
  measures: readonly ClipMeasure[],
  ratings: readonly Rating[],
  options: ObjectiveOptions = {},
): MeasureCorrelation[] {
  const level = levelOf(ratings, options)
  const attributeIds = [...new Map(ratings.map((r) => [String(r.attribute), r.attribute])).values()]
  return correlateMeasures(measures, perceivedMeans(ratings, unitFor(level)), attributeIds, level)
}

/**
 * The correlations of objectiveVsPerceived from means already taken (the findings page draws
 * the same means as points, and takes them once).
 */
export function correlateMeasures(
  measures: readonly ClipMeasure[],
  perceived: PerceivedMeans,
  attributeIds: readonly Id[],
  level: 'clip' | 'recipe',
): MeasureCorrelation[] {
  const unit = (x: ClipMeasure) => String(unitFor(level)(x))
  const SEP = '\u0000'
  const measured = averageBy(
    measures,
    (m) => [m.measure, unit(m)].join(SEP),
    (m) => m.value,
  )
  const measureNames = [...new Set(measures.map((m) => m.measure))]
  const units = [...new Set(measures.map(unit))]

  const out: MeasureCorrelation[] = []
  for (const measure of measureNames) {
    for (const attribute of attributeIds) {
      const x: number[] = []
      const y: number[] = []
      for (const u of units) {
        const m = measured.get([measure, u].join(SEP))
        const p = perceived.get(u)?.get(String(attribute))
        if (m !== undefined && p !== undefined) {
          x.push(m)
          y.push(p)
        }
      }
      const result = spearman(x, y)
      const linear = pearsonTest(x, y)
      out.push({
        measure,
        attribute,
        n: result.n,
        rho: result.r,
        p: result.p,
        pearsonR: linear.r,
        pearsonP: linear.p,
        pearsonCi: linear.ci,
        reason: result.reason,
      })
    }
  }
  return out
}
