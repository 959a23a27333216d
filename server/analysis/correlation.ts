import tCdf from '@stdlib/stats-base-dists-t-cdf'
import { meanOf } from './describe.ts'
import { rankAverage } from './rank.ts'
import type { Reason } from './types.ts'

export interface CorrelationResult {
  n: number
  r: number | null
  p: number | null
  method: 'exact' | 't' | null
  reason: Reason
}

/** Pearson r, or null when either side is constant. */
export function pearson(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  const n = Math.min(x.length, y.length)
  if (n < 2) return null
  const mx = meanOf(x)
  const my = meanOf(y)
  let sxy = 0
  let sxx = 0
  let syy = 0
  for (let i = 0; i < n; i++) {
    const dx = x[i] - mx
    const dy = y[i] - my
    sxy += dx * dy
    sxx += dx * dx
    syy += dy * dy
  }
  if (sxx <= 0 || syy <= 0) return null
  return Math.max(-1, Math.min(1, sxy / Math.sqrt(sxx * syy)))
}

/** Up to this many pairs without ties, Spearman's p is exact (R's cor.test does the same). */
export const SPEARMAN_EXACT_LIMIT = 9

// Null distribution of S = Σ d² over all n! orderings, built once per n (at most 9! = 362,880).
const spearmanCounts = new Map<number, Float64Array>()

function spearmanDistribution(n: number): Float64Array {
  const cached = spearmanCounts.get(n)
  if (cached) return cached
  const maxS = (n * n * n - n) / 3
  const counts = new Float64Array(maxS + 1)
  const perm = Array.from({ length: n }, (_, i) => i)
  const used = new Array<boolean>(n).fill(false)
  const walk = (position: number, s: number) => {
    if (position === n) {
      counts[s]++
      return
    }
    for (let v = 0; v < n; v++) {
      if (used[v]) continue
      used[v] = true
      perm[position] = v
      walk(position + 1, s + (v - position) * (v - position))
      used[v] = false
    }
  }
  walk(0, 0)
  spearmanCounts.set(n, counts)
  return counts
}

function exactSpearmanP(s: number, n: number): number {
  const counts = spearmanDistribution(n)
  let total = 0
  for (const c of counts) total += c
  const rounded = Math.round(s)
  let tail = 0
  // Same tail choice as R: the side of the mean the statistic falls on, doubled.
  if (rounded > (n * n * n - n) / 6) {
    for (let v = rounded; v < counts.length; v++) tail += counts[v]
  } else {
    for (let v = 0; v <= rounded; v++) tail += counts[v]
  }
  return Math.min(1, (2 * tail) / total)
}

/** Spearman's rho alone (Pearson r of average ranks), for callers that need no p-value. */
export function spearmanRho(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  const n = Math.min(x.length, y.length)
  if (n < 2) return null
  const rx = rankAverage(Array.from({ length: n }, (_, i) => x[i]))
  const ry = rankAverage(Array.from({ length: n }, (_, i) => y[i]))
  return pearson(rx.ranks, ry.ranks)
}

/**
 * Spearman's rho with a two-sided p: exact for n ≤ 9 without ties, otherwise the t
 * approximation t = r·√((n − 2)/(1 − r²)) on n − 2 df (common practice; R uses an Edgeworth
 * series there, so p can differ in the third decimal for 10–20 pairs).
 */
export function spearman(x: ArrayLike<number>, y: ArrayLike<number>): CorrelationResult {
  const n = Math.min(x.length, y.length)
  if (n < 3) return { n, r: null, p: null, method: null, reason: 'not enough data' }
  const rx = rankAverage(Array.from({ length: n }, (_, i) => x[i]))
  const ry = rankAverage(Array.from({ length: n }, (_, i) => y[i]))
  const r = pearson(rx.ranks, ry.ranks)
  if (r === null) return { n, r: null, p: null, method: null, reason: 'no variance' }
  if (n <= SPEARMAN_EXACT_LIMIT && rx.tieTerm === 0 && ry.tieTerm === 0) {
    let s = 0
    for (let i = 0; i < n; i++) s += (rx.ranks[i] - ry.ranks[i]) ** 2
    return { n, r, p: exactSpearmanP(s, n), method: 'exact', reason: null }
  }
  if (Math.abs(r) >= 1) return { n, r, p: 0, method: 't', reason: null }
  const t = r * Math.sqrt((n - 2) / (1 - r * r))
  return { n, r, p: Math.min(1, 2 * tCdf(-Math.abs(t), n - 2)), method: 't', reason: null }
}
