import { spearman } from './correlation.ts'
import type { Id, Rating, Reason } from './types.ts'

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

/** Spearman rho between each measure and each attribute's mean rating, across clips or recipes. */
export function objectiveVsPerceived(
  measures: readonly ClipMeasure[],
  ratings: readonly Rating[],
  options: ObjectiveOptions = {},
): MeasureCorrelation[] {
  const level =
    options.level ??
    (ratings.length > 0 && ratings.every((r) => r.clip != null) ? 'clip' : 'recipe')
  const unit = (x: { clip?: Id; recipe: Id }) => String(level === 'clip' ? x.clip : x.recipe)
  const SEP = '\u0000'
  // Player means first, so a player who heard a clip twice does not count twice.
  const playerMeans = averageBy(
    ratings,
    (r) => [unit(r), String(r.attribute), String(r.player)].join(SEP),
    (r) => r.value,
  )
  const perceived = averageBy(
    [...playerMeans],
    ([k]) => k.split(SEP).slice(0, 2).join(SEP),
    ([, v]) => v,
  )
  const measured = averageBy(
    measures,
    (m) => [m.measure, unit(m)].join(SEP),
    (m) => m.value,
  )
  const attributeIds = [...new Map(ratings.map((r) => [String(r.attribute), r.attribute])).values()]
  const measureNames = [...new Set(measures.map((m) => m.measure))]
  const units = [...new Set(measures.map(unit))]

  const out: MeasureCorrelation[] = []
  for (const measure of measureNames) {
    for (const attribute of attributeIds) {
      const x: number[] = []
      const y: number[] = []
      for (const u of units) {
        const m = measured.get([measure, u].join(SEP))
        const p = perceived.get([u, String(attribute)].join(SEP))
        if (m !== undefined && p !== undefined) {
          x.push(m)
          y.push(p)
        }
      }
      const result = spearman(x, y)
      out.push({
        measure,
        attribute,
        n: result.n,
        rho: result.r,
        p: result.p,
        reason: result.reason,
      })
    }
  }
  return out
}
