import gammainc from '@stdlib/math-base-special-gammainc'
import { rankAverage } from './rank.ts'
import type { Reason } from './types.ts'

export interface FriedmanResult {
  /** Blocks (players) used. */
  n: number
  /** Treatments (recipes). */
  k: number
  chiSquare: number | null
  df: number | null
  p: number | null
  /** Kendall's coefficient of concordance, chi-square / (n (k − 1)), tie-corrected with it. */
  kendallW: number | null
  /** Sum of within-block ranks per treatment (rank 1 = lowest value). */
  rankSums: number[]
  reason: Reason
}

/**
 * Friedman rank sum test with the tie correction R's friedman.test uses. Rows are blocks
 * (players), columns treatments (recipes); rows must be complete.
 */
export function friedman(rows: ReadonlyArray<ArrayLike<number>>): FriedmanResult {
  const n = rows.length
  const k = n > 0 ? rows[0].length : 0
  const rankSums = new Array<number>(k).fill(0)
  const empty = { n, k, chiSquare: null, df: null, p: null, kendallW: null, rankSums }
  for (const row of rows) {
    if (row.length !== k) throw new RangeError('friedman: every row needs one value per recipe')
    for (let j = 0; j < k; j++) {
      if (!Number.isFinite(row[j]))
        throw new RangeError('friedman: rows must be complete and finite')
    }
  }
  if (k < 3) return { ...empty, reason: 'fewer than three recipes' }
  if (n < 2) return { ...empty, reason: 'fewer than two players rated every recipe' }

  let tieTerm = 0
  for (const row of rows) {
    const ranking = rankAverage(row)
    for (let j = 0; j < k; j++) rankSums[j] += ranking.ranks[j]
    tieTerm += ranking.tieTerm
  }
  const expected = (n * (k + 1)) / 2
  let spread = 0
  for (const sum of rankSums) spread += (sum - expected) ** 2
  const denominator = n * k * (k + 1) - tieTerm / (k - 1)
  // Every block tied throughout leaves nothing to rank.
  if (denominator <= 1e-9) return { ...empty, reason: 'no variance' }
  const chiSquare = (12 * spread) / denominator
  const df = k - 1
  return {
    n,
    k,
    chiSquare,
    df,
    // The χ² upper tail as the regularized upper incomplete gamma Q(df/2, x/2), computed as
    // such: 1 − cdf would be 0 or rounded for a strong effect (R: pchisq(lower.tail = FALSE)).
    p: gammainc(chiSquare / 2, df / 2, true, true),
    kendallW: chiSquare / (n * df),
    rankSums,
    reason: null,
  }
}
