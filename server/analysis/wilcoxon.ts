import normalCdf from '@stdlib/stats-base-dists-normal-cdf'
import { requireFinite, requireSameLength } from './inputs.ts'
import type { Alternative, Reason } from './types.ts'

/** R switches to the normal approximation at 50 non-zero differences; so do we. */
export const WILCOXON_EXACT_LIMIT = 50

// Even when exact is asked for, the table costs n³/2 steps to build; beyond this the normal
// approximation is indistinguishable and a request cannot stall the server.
const EXACT_HARD_LIMIT = 200

export interface WilcoxonResult {
  /** Non-zero differences used (zeros are dropped, as R does). */
  n: number
  zeros: number
  /** Sum of ranks of positive differences: R's V. */
  V: number | null
  p: number | null
  method: 'exact' | 'normal' | null
  /** Matched-pairs rank-biserial correlation, (R+ − R−) / (R+ + R−). */
  rankBiserial: number | null
  reason: Reason
}

export interface WilcoxonOptions {
  alternative?: Alternative
  /** Default as R: exact when n < 50 and there are neither ties nor zeros. */
  exact?: boolean
  /** Continuity correction for the normal approximation (default true, as R). */
  correct?: boolean
  /**
   * Significant digits the magnitudes are ranked at (default 7, as R's digits.rank = 7):
   * differences of means that are equal but were summed in another order differ in the last
   * bits, and must still tie. Infinity ranks them exactly as computed.
   */
  digitsRank?: number
}

/** `v` (> 0) rounded to `digits` significant digits, as R's signif does for ranking. */
function significant(v: number, digits: number): number {
  if (!Number.isFinite(digits)) return v
  const scale = 10 ** (digits - 1 - Math.floor(Math.log10(v)))
  // Dividing by a whole power of ten, never multiplying by its inexact inverse.
  return scale >= 1 ? Math.round(v * scale) / scale : Math.round(v / (1 / scale)) * (1 / scale)
}

// Cumulative counts of the signed-rank statistic for each n, built once by the classic
// recurrence c_n(s) = c_{n−1}(s) + c_{n−1}(s − n). Counts stay below 2^53 for n < 50, so the
// doubles are exact.
const cumulativeByN: Float64Array[] = []

function cumulativeCounts(n: number): Float64Array {
  const cached = cumulativeByN[n]
  if (cached) return cached
  const max = (n * (n + 1)) / 2
  let counts = new Float64Array(1)
  counts[0] = 1
  for (let m = 1; m <= n; m++) {
    const size = (m * (m + 1)) / 2 + 1
    const next = new Float64Array(size)
    next.set(counts)
    for (let s = m; s < size; s++) next[s] += counts[s - m]
    counts = next
  }
  const cumulative = new Float64Array(max + 1)
  let running = 0
  for (let s = 0; s <= max; s++) {
    running += counts[s]
    cumulative[s] = running
  }
  cumulativeByN[n] = cumulative
  return cumulative
}

/** P(V ≤ v) under H0 for n untied, non-zero differences (R's psignrank). */
export function signedRankCdf(v: number, n: number): number {
  if (!Number.isInteger(n) || n < 0 || n > EXACT_HARD_LIMIT) {
    throw new RangeError(`signedRankCdf: n must be an integer from 0 to ${EXACT_HARD_LIMIT}`)
  }
  const max = (n * (n + 1)) / 2
  const s = Math.floor(v + 1e-7)
  if (s < 0) return 0
  if (s >= max) return 1
  const cumulative = cumulativeCounts(n)
  return cumulative[s] / cumulative[max]
}

/**
 * Largest T with P(V ≤ T) ≤ alpha/2 (two-sided): the value printed in critical-value tables.
 * Null when no T qualifies, which is how tables print a dash for very small n.
 */
export function wilcoxonCriticalT(n: number, alpha = 0.05): number | null {
  let critical: number | null = null
  const max = (n * (n + 1)) / 2
  for (let t = 0; t <= max; t++) {
    if (signedRankCdf(t, n) <= alpha / 2 + 1e-12) critical = t
    else break
  }
  return critical
}

/** Wilcoxon signed-rank test on x − y (or on x alone when y is omitted), matching R. */
export function wilcoxonSignedRank(
  x: ArrayLike<number>,
  y?: ArrayLike<number>,
  options: WilcoxonOptions = {},
): WilcoxonResult {
  const { alternative = 'two-sided', correct = true, digitsRank = 7 } = options
  requireFinite('wilcoxonSignedRank', x, 'x')
  if (y) {
    requireSameLength('wilcoxonSignedRank', x, y)
    requireFinite('wilcoxonSignedRank', y, 'y')
  }
  const length = x.length
  // Positive and negative magnitudes are sorted apart with the native numeric sort and then
  // merged, which ranks |d| without a comparator callback: this runs for every recipe pair.
  const positive = new Float64Array(length)
  const negative = new Float64Array(length)
  let np = 0
  let nn = 0
  let zeros = 0
  for (let i = 0; i < length; i++) {
    const d = y ? x[i] - y[i] : x[i]
    // Zeros are found before rounding, as R does; only the ranks use the rounded magnitudes.
    if (d > 0) positive[np++] = significant(d, digitsRank)
    else if (d < 0) negative[nn++] = significant(-d, digitsRank)
    else zeros++
  }
  const n = np + nn
  const empty = { n, zeros, V: null, p: null, method: null, rankBiserial: null }
  if (n === 0) return { ...empty, reason: zeros > 0 ? 'no variance' : 'no player rated both' }
  const { V, tieTerm } = positiveRankSum(
    positive.subarray(0, np).sort(),
    negative.subarray(0, nn).sort(),
  )
  const total = (n * (n + 1)) / 2
  const rankBiserial = (2 * V) / total - 1

  const useExact = (options.exact ?? n < WILCOXON_EXACT_LIMIT) && tieTerm === 0 && zeros === 0
  let p: number
  if (useExact && n <= EXACT_HARD_LIMIT) {
    // P(V ≥ v) = P(V ≤ total − v) by symmetry: a lower tail, never 1 − cdf, keeps tiny p.
    const upper = () => signedRankCdf(total - V, n)
    const lower = () => signedRankCdf(V, n)
    if (alternative === 'greater') p = upper()
    else if (alternative === 'less') p = lower()
    else p = Math.min(1, 2 * (V > total / 2 ? upper() : lower()))
    return { n, zeros, V, p, method: 'exact', rankBiserial, reason: null }
  }

  const z0 = V - total / 2
  const sigma = Math.sqrt((n * (n + 1) * (2 * n + 1)) / 24 - tieTerm / 48)
  let correction = 0
  if (correct) {
    if (alternative === 'two-sided') correction = Math.sign(z0) * 0.5
    else correction = alternative === 'greater' ? 0.5 : -0.5
  }
  const z = (z0 - correction) / sigma
  if (alternative === 'greater') p = normalCdf(-z, 0, 1)
  else if (alternative === 'less') p = normalCdf(z, 0, 1)
  else p = Math.min(1, 2 * normalCdf(-Math.abs(z), 0, 1))
  return { n, zeros, V, p, method: 'normal', rankBiserial, reason: null }
}

/** Sum of the average ranks of the positive magnitudes among all magnitudes, both sorted. */
function positiveRankSum(
  positive: Float64Array,
  negative: Float64Array,
): { V: number; tieTerm: number } {
  let i = 0
  let j = 0
  let below = 0
  let V = 0
  let tieTerm = 0
  while (i < positive.length || j < negative.length) {
    const value = Math.min(positive[i] ?? Infinity, negative[j] ?? Infinity)
    let inPositive = 0
    let inNegative = 0
    while (i < positive.length && positive[i] === value) {
      i++
      inPositive++
    }
    while (j < negative.length && negative[j] === value) {
      j++
      inNegative++
    }
    const t = inPositive + inNegative
    V += inPositive * (below + (t + 1) / 2)
    if (t > 1) tieTerm += t * t * t - t
    below += t
  }
  return { V, tieTerm }
}
