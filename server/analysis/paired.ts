import tCdf from '@stdlib/stats-base-dists-t-cdf'
import tQuantile from '@stdlib/stats-base-dists-t-quantile'
import { isEffectivelyZero, meanOf, varianceOf } from './describe.ts'
import { requireFinite, requireSameLength } from './inputs.ts'
import type { Alternative, Interval, Reason } from './types.ts'

export interface PairedTResult {
  /** Number of complete pairs used. */
  n: number
  /** Mean of x − y. */
  meanDifference: number | null
  sdDifference: number | null
  ci: Interval | null
  t: number | null
  df: number | null
  p: number | null
  /** Cohen's dz: mean difference over the SD of differences. */
  dz: number | null
  reason: Reason
}

export interface PairedTOptions {
  alternative?: Alternative
  level?: number
}

/** Paired t-test on x − y, the same convention as R's t.test(x, y, paired = TRUE). */
export function pairedTTest(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  options: PairedTOptions = {},
): PairedTResult {
  requireSameLength('pairedTTest', x, y)
  const n = x.length
  const d = new Float64Array(n)
  for (let i = 0; i < n; i++) d[i] = x[i] - y[i]
  requireFinite('pairedTTest', d, 'x and y')
  return oneSampleT(d, options)
}

/** One-sample t on differences; split out so callers holding differences skip a copy. */
export function oneSampleT(
  differences: ArrayLike<number>,
  options: PairedTOptions = {},
): PairedTResult {
  const { alternative = 'two-sided', level = 0.95 } = options
  requireFinite('oneSampleT', differences, 'differences')
  const d = differences
  const n = d.length
  const empty = {
    n,
    meanDifference: null,
    sdDifference: null,
    ci: null,
    t: null,
    df: null,
    p: null,
    dz: null,
  }
  if (n < 2) {
    if (n === 0) return { ...empty, reason: 'no player rated both' }
    return { ...empty, meanDifference: d[0], reason: 'only one player rated both' }
  }
  const mean = meanOf(d)
  const sd = Math.sqrt(varianceOf(d, mean))
  // A constant set of differences has no sampling spread; t would be 0/0 or ±Infinity.
  if (isEffectivelyZero(sd, mean)) {
    return { ...empty, meanDifference: mean, sdDifference: 0, reason: 'no variance' }
  }
  const df = n - 1
  const se = sd / Math.sqrt(n)
  const t = mean / se
  let p: number
  let ci: Interval
  if (alternative === 'less') {
    p = tCdf(t, df)
    ci = { lower: -Infinity, upper: mean + tQuantile(level, df) * se }
  } else if (alternative === 'greater') {
    p = tCdf(-t, df)
    ci = { lower: mean - tQuantile(level, df) * se, upper: Infinity }
  } else {
    // Lower tail of −|t| keeps precision for very small p-values.
    p = Math.min(1, 2 * tCdf(-Math.abs(t), df))
    const half = tQuantile(1 - (1 - level) / 2, df) * se
    ci = { lower: mean - half, upper: mean + half }
  }
  return { n, meanDifference: mean, sdDifference: sd, ci, t, df, p, dz: mean / sd, reason: null }
}
