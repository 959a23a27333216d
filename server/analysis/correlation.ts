import { meanOf } from './describe.ts'
import { requireFinite, requireSameLength } from './inputs.ts'
import { rankAverage } from './rank.ts'
import { spearmanP } from './spearmanP.ts'
import type { Reason } from './types.ts'

export interface CorrelationResult {
  n: number
  r: number | null
  p: number | null
  /** How p was found: every ordering counted, AS 89's series, or the t approximation. */
  method: 'exact' | 'series' | 't' | null
  reason: Reason
}

/** Pearson r, or null when either side is constant. Refuses unequal lengths and NaN. */
export function pearson(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  checkPairs('pearson', x, y)
  const n = x.length
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

/** Up to this many pairs without ties, Spearman's p counts every ordering (as R's does). */
export const SPEARMAN_EXACT_LIMIT = 9

function checkPairs(caller: string, x: ArrayLike<number>, y: ArrayLike<number>): void {
  requireSameLength(caller, x, y)
  requireFinite(caller, x, 'x')
  requireFinite(caller, y, 'y')
}

/** Spearman's rho alone (Pearson r of average ranks), for callers that need no p-value. */
export function spearmanRho(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  checkPairs('spearmanRho', x, y)
  const n = x.length
  if (n < 2) return null
  const rx = rankAverage(Array.from({ length: n }, (_, i) => x[i]))
  const ry = rankAverage(Array.from({ length: n }, (_, i) => y[i]))
  return pearson(rx.ranks, ry.ranks)
}

/**
 * Spearman's rho with a two-sided p as R's cor.test(method = "spearman") computes it by default:
 * without ties and up to 1290 pairs from S = Σd² by AS 89 (every ordering for n ≤ 9, an
 * Edgeworth series beyond), otherwise the t approximation on n − 2 df.
 */
export function spearman(x: ArrayLike<number>, y: ArrayLike<number>): CorrelationResult {
  checkPairs('spearman', x, y)
  const n = x.length
  if (n < 3) return { n, r: null, p: null, method: null, reason: 'fewer than three pairs' }
  const rx = rankAverage(Array.from({ length: n }, (_, i) => x[i]))
  const ry = rankAverage(Array.from({ length: n }, (_, i) => y[i]))
  const r = pearson(rx.ranks, ry.ranks)
  if (r === null) return { n, r: null, p: null, method: null, reason: 'no variance' }
  const { p, method } = spearmanP(r, n, rx.tieTerm > 0 || ry.tieTerm > 0)
  return { n, r, p, method, reason: null }
}
