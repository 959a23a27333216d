import tQuantile from '@stdlib/stats-base-dists-t-quantile'
import type { Interval, Reason } from './types.ts'

export interface MeanSummary {
  n: number
  mean: number | null
  sd: number | null
  /** t-based interval; null when fewer than two values. */
  ci: Interval | null
  reason: Reason
}

// Plain loops rather than generic helpers: these run hundreds of times per findings call.
export function meanOf(values: ArrayLike<number>): number {
  let sum = 0
  for (let i = 0; i < values.length; i++) sum += values[i]
  return sum / values.length
}

/** Sample variance (n − 1), two-pass for accuracy on scores far from zero. */
export function varianceOf(values: ArrayLike<number>, mean = meanOf(values)): number {
  let ss = 0
  for (let i = 0; i < values.length; i++) {
    const d = values[i] - mean
    ss += d * d
  }
  return ss / (values.length - 1)
}

/** Mean with a t-interval; a constant sample gets a zero-width interval, which is honest. */
export function summarizeMean(values: ArrayLike<number>, level = 0.95): MeanSummary {
  const n = values.length
  if (n === 0) return { n, mean: null, sd: null, ci: null, reason: 'nobody rated it' }
  const mean = meanOf(values)
  if (n === 1) return { n, mean, sd: null, ci: null, reason: 'only one player rated it' }
  const sd = Math.sqrt(varianceOf(values, mean))
  const half = tQuantile(1 - (1 - level) / 2, n - 1) * (sd / Math.sqrt(n))
  return { n, mean, sd, ci: { lower: mean - half, upper: mean + half }, reason: null }
}

/** Treats values that are equal up to rounding noise as tied, as R does for constant data. */
export function isEffectivelyZero(x: number, scale: number): boolean {
  return Math.abs(x) <= 1e-12 * Math.max(1, Math.abs(scale))
}
