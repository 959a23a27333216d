import betaQuantile from '@stdlib/stats-base-dists-beta-quantile'
import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf'
import { gammaln } from 'simple-statistics'
import type { Alternative, Interval, Reason } from './types.ts'

export interface BinomialTestResult {
  successes: number
  n: number
  /** Observed share, successes / n. */
  estimate: number | null
  p: number | null
  /** Clopper–Pearson (exact) interval for the share. */
  ci: Interval | null
  reason: Reason
}

export interface BinomialTestOptions {
  p0?: number
  alternative?: Alternative
  level?: number
}

export function binomialPmf(x: number, n: number, p: number): number {
  if (x < 0 || x > n) return 0
  if (p === 0) return x === 0 ? 1 : 0
  if (p === 1) return x === n ? 1 : 0
  const logChoose = gammaln(n + 1) - gammaln(x + 1) - gammaln(n - x + 1)
  return Math.exp(logChoose + x * Math.log(p) + (n - x) * Math.log1p(-p))
}

/** P(X ≤ x); clamps outside the support so callers can pass x = −1 or n. */
export function binomialLower(x: number, n: number, p: number): number {
  if (x < 0) return 0
  if (x >= n) return 1
  return binomialCdf(x, n, p)
}

/** P(X ≥ x), computed from the mirrored lower tail so tiny p-values keep their precision. */
export function binomialUpper(x: number, n: number, p: number): number {
  if (x <= 0) return 1
  if (x > n) return 0
  return binomialLower(n - x, n, 1 - p)
}

/** Exact (Clopper–Pearson) interval, as R's binom.test reports. */
export function clopperPearson(x: number, n: number, level = 0.95): Interval | null {
  if (n <= 0) return null
  const alpha = 1 - level
  return {
    lower: x === 0 ? 0 : betaQuantile(alpha / 2, x, n - x + 1),
    upper: x === n ? 1 : betaQuantile(1 - alpha / 2, x + 1, n - x),
  }
}

/**
 * Exact binomial test as R's binom.test: the two-sided p sums every outcome no more likely than
 * the one observed (with R's 1e-7 relative slack so symmetric outcomes are not lost to rounding).
 */
export function binomialTest(
  successes: number,
  n: number,
  options: BinomialTestOptions = {},
): BinomialTestResult {
  const { p0 = 0.5, alternative = 'two-sided', level = 0.95 } = options
  checkCounts('binomialTest', successes, n)
  if (!(p0 > 0 && p0 < 1))
    throw new RangeError('binomialTest: p0 must lie strictly between 0 and 1')
  if (n === 0) return { successes, n, estimate: null, p: null, ci: null, reason: 'no answers' }
  const x = successes
  const estimate = x / n
  let p: number
  let ci: Interval
  if (alternative === 'less') {
    p = binomialLower(x, n, p0)
    ci = { lower: 0, upper: x === n ? 1 : betaQuantile(level, x + 1, n - x) }
  } else if (alternative === 'greater') {
    p = binomialUpper(x, n, p0)
    ci = { lower: x === 0 ? 0 : betaQuantile(1 - level, x, n - x + 1), upper: 1 }
  } else {
    p = twoSidedP(x, n, p0)
    ci = clopperPearson(x, n, level) as Interval
  }
  return { successes, n, estimate, p, ci, reason: null }
}

/** Counts are whole numbers with 0 ≤ successes ≤ n: anything else is a caller's mistake. */
export function checkCounts(caller: string, successes: number, n: number): void {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`${caller}: n must be a whole number ≥ 0`)
  if (!Number.isInteger(successes) || successes < 0 || successes > n) {
    throw new RangeError(`${caller}: successes must be a whole number from 0 to n`)
  }
}

function twoSidedP(x: number, n: number, p0: number): number {
  const relErr = 1 + 1e-7
  const d = binomialPmf(x, n, p0)
  const m = n * p0
  if (x === m) return 1
  let y = 0
  if (x < m) {
    for (let i = Math.ceil(m); i <= n; i++) if (binomialPmf(i, n, p0) <= d * relErr) y++
    return Math.min(1, binomialLower(x, n, p0) + binomialUpper(n - y + 1, n, p0))
  }
  for (let i = 0; i <= Math.floor(m); i++) if (binomialPmf(i, n, p0) <= d * relErr) y++
  return Math.min(1, binomialLower(y - 1, n, p0) + binomialUpper(x, n, p0))
}

export interface SignTestResult extends BinomialTestResult {
  /** Answers with no preference, left out of the test. */
  ties: number
}

/**
 * Sign test for a two-way preference: how often the first was chosen over the second, with
 * no-preference answers set aside (the usual handling; they carry no direction).
 */
export function signTest(
  firstPreferred: number,
  secondPreferred: number,
  ties = 0,
  level = 0.95,
): SignTestResult {
  const n = firstPreferred + secondPreferred
  const result = binomialTest(firstPreferred, n, { p0: 0.5, level })
  if (n === 0 && ties > 0) return { ...result, reason: 'every answer was no preference', ties }
  return { ...result, ties }
}
