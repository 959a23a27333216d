import normalCdf from '@stdlib/stats-base-dists-normal-cdf'
import tCdf from '@stdlib/stats-base-dists-t-cdf'

/*
 * The p-value of Spearman's rho as R's cor.test(method = "spearman") gives it by default:
 * from S = Σ d² (the sum of squared rank differences), for n < 1290 pairs without ties by
 * algorithm AS 89 (Best & Roberts 1975, Applied Statistics 24:377): every ordering counted for
 * n ≤ 9, an Edgeworth series beyond; with ties, or from 1290 pairs, the t approximation on
 * n − 2 degrees of freedom.
 */

/** Beyond this many pairs R (and so Ringdown) uses the t approximation even without ties. */
export const SPEARMAN_SERIES_LIMIT = 1290
const EXACT_LIMIT = 9

// Number of orderings with S ≥ s, per n, built once (at most 9! = 362,880 orderings).
const atLeast = new Map<number, Float64Array>()

function countsAtLeast(n: number): Float64Array {
  const cached = atLeast.get(n)
  if (cached) return cached
  const max = (n * n * n - n) / 3
  const counts = new Float64Array(max + 1)
  const used = new Array<boolean>(n).fill(false)
  const walk = (position: number, s: number) => {
    if (position === n) {
      counts[s]++
      return
    }
    for (let v = 0; v < n; v++) {
      if (used[v]) continue
      used[v] = true
      walk(position + 1, s + (v - position) * (v - position))
      used[v] = false
    }
  }
  walk(0, 0)
  for (let s = max - 1; s >= 0; s--) counts[s] += counts[s + 1]
  atLeast.set(n, counts)
  return counts
}

/** P(S ≥ s) under independence, for n pairs without ties (AS 89). */
export function spearmanUpper(s: number, n: number): number {
  const max = (n * n * n - n) / 3
  if (s <= 0) return 1
  if (s > max) return 0
  if (n <= EXACT_LIMIT) {
    const counts = countsAtLeast(n)
    let factorial = 1
    for (let k = 2; k <= n; k++) factorial *= k
    return counts[Math.ceil(s)] / factorial
  }
  return Math.min(1, Math.max(0, edgeworthUpper(s, n)))
}

/** P(S ≤ s): S takes only even values, so it is 1 − P(S ≥ s + 2) for a whole even s. */
export function spearmanLower(s: number, n: number): number {
  const max = (n * n * n - n) / 3
  if (s < 0) return 0
  if (s >= max) return 1
  if (n <= EXACT_LIMIT) return 1 - spearmanUpper(s + 2, n)
  return Math.min(1, Math.max(0, 1 - edgeworthUpper(s + 2, n)))
}

// AS 89's Edgeworth series for P(S ≥ s), coefficients as published.
const C = [
  0.2274, 0.2531, 0.1745, 0.0758, 0.1033, 0.3932, 0.0879, 0.0151, 0.0072, 0.0831, 0.0131, 4.6e-4,
]

function edgeworthUpper(s: number, n: number): number {
  const [c1, c2, c3, c4, c5, c6, c7, c8, c9, c10, c11, c12] = C
  const b = 1 / n
  const x = ((6 * (s - 1) * b) / (n * n - 1) - 1) * Math.sqrt(n - 1)
  let y = x * x
  const u =
    x *
    b *
    (c1 +
      b * (c2 + c3 * b) +
      y *
        (-c4 +
          b * (c5 + c6 * b) -
          y * b * (c7 + c8 * b - y * (c9 - c10 * b + y * b * (c11 - c12 * y)))))
  y = u / Math.exp(y / 2)
  return y + normalCdf(-x, 0, 1)
}

/**
 * Two-sided p for rho from n pairs, as R's cor.test: exact or series (AS 89) without ties and
 * up to 1290 pairs, the t approximation otherwise. The side is the one S falls on, doubled.
 */
export function spearmanP(
  rho: number,
  n: number,
  ties: boolean,
): { p: number; method: 'exact' | 'series' | 't' } {
  if (ties || n > SPEARMAN_SERIES_LIMIT) {
    if (Math.abs(rho) >= 1) return { p: 0, method: 't' }
    const t = rho * Math.sqrt((n - 2) / (1 - rho * rho))
    return { p: Math.min(1, 2 * tCdf(-Math.abs(t), n - 2)), method: 't' }
  }
  const s = Math.round(((n * n * n - n) * (1 - rho)) / 6)
  const tail = s > (n * n * n - n) / 6 ? spearmanUpper(s, n) : spearmanLower(s, n)
  return { p: Math.min(1, 2 * tail), method: n <= EXACT_LIMIT ? 'exact' : 'series' }
}
