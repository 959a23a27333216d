import normalQuantile from '@stdlib/stats-base-dists-normal-quantile'
import tCdf from '@stdlib/stats-base-dists-t-cdf'
import { pearson } from './correlation.ts'
import type { Interval, Reason } from './types.ts'

export interface PearsonTestResult {
  n: number
  r: number | null
  t: number | null
  df: number | null
  /** Two-sided. */
  p: number | null
  /** Fisher-z interval, tanh(atanh r ± z/√(n − 3)); null below four pairs, where it has no width. */
  ci: Interval | null
  reason: Reason
}

/** Pearson's r with its t test and Fisher-z interval, as R's cor.test(x, y) (method pearson). */
export function pearsonTest(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  level = 0.95,
): PearsonTestResult {
  const n = x.length
  const none = { n, r: null, t: null, df: null, p: null, ci: null }
  // pearson() checks the lengths and the values.
  const r = pearson(x, y)
  if (n < 3) return { ...none, reason: 'fewer than three pairs' }
  if (r === null) return { ...none, reason: 'no variance' }
  const df = n - 2
  const ci = n > 3 ? fisherInterval(r, n, level) : null
  if (Math.abs(r) >= 1) return { n, r, t: null, df, p: 0, ci, reason: null }
  const t = r * Math.sqrt(df / (1 - r * r))
  return { n, r, t, df, p: Math.min(1, 2 * tCdf(-Math.abs(t), df)), ci, reason: null }
}

function fisherInterval(r: number, n: number, level: number): Interval {
  if (Math.abs(r) >= 1) return { lower: r, upper: r }
  const z = Math.atanh(r)
  const half = normalQuantile(1 - (1 - level) / 2, 0, 1) / Math.sqrt(n - 3)
  return { lower: Math.tanh(z - half), upper: Math.tanh(z + half) }
}
