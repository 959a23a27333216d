import { ADJUSTMENT_LABEL, adjustP, type Adjustment } from './adjust.ts'
import { oneSampleT, type PairedTResult } from './paired.ts'
import { pairSentence } from './sentences.ts'
import type { Id, Interval, Reason } from './types.ts'
import { wilcoxonSignedRank } from './wilcoxon.ts'

// Every recipe pair on one attribute: paired t and Wilcoxon signed-rank on complete cases,
// adjusted (Holm or BH) within the attribute, with the sentence the findings page shows.

export interface PairRow {
  first: Id
  second: Id
  /** Complete cases: players who rated both on this attribute. */
  n: number
  /** Players who rated this attribute but not both recipes. */
  dropped: number
  /** Mean of second − first, with its 95% CI. */
  difference: number | null
  /** SD of the players' differences. */
  sdDifference: number | null
  ci: Interval | null
  t: number | null
  df: number | null
  p: number | null
  adjustedP: number | null
  wilcoxonV: number | null
  wilcoxonP: number | null
  wilcoxonMethod: 'exact' | 'normal' | null
  wilcoxonAdjustedP: number | null
  dz: number | null
  rankBiserial: number | null
  sentence: string
  reason: Reason
}

export interface Wording {
  name: string
  higher?: string
  alpha: number
  adjustment: Adjustment
  interim?: { targetDifference: number | null } | null
}

/**
 * `active` holds one row per player who rated the attribute, a column per recipe (NaN where
 * the player did not rate it).
 */
export function recipePairs(
  active: readonly Float64Array[],
  recipes: readonly Id[],
  recipeName: (id: Id) => string,
  wording: Wording,
): PairRow[] {
  const k = recipes.length
  const pairs: Omit<PairRow, 'adjustedP' | 'wilcoxonAdjustedP' | 'sentence'>[] = []
  const tResults: PairedTResult[] = []
  const buffer = new Float64Array(active.length)
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      let n = 0
      for (const row of active) {
        const d = row[j] - row[i]
        // NaN (a missing side) fails this test: complete cases only.
        if (d === d) buffer[n++] = d
      }
      const d = buffer.subarray(0, n)
      const t = oneSampleT(d)
      const w = wilcoxonSignedRank(d)
      tResults.push(t)
      pairs.push({
        first: recipes[i],
        second: recipes[j],
        n,
        dropped: active.length - n,
        difference: t.meanDifference,
        sdDifference: t.sdDifference,
        ci: t.ci,
        t: t.t,
        df: t.df,
        p: t.p,
        wilcoxonV: w.V,
        wilcoxonP: w.p,
        wilcoxonMethod: w.method,
        dz: t.dz,
        rankBiserial: w.rankBiserial,
        reason: t.reason,
      })
    }
  }
  // One family per attribute, adjusted once for each test.
  const adjustedT = adjustP(
    pairs.map((p) => p.p),
    wording.adjustment,
  )
  const adjustedW = adjustP(
    pairs.map((p) => p.wilcoxonP),
    wording.adjustment,
  )
  const label = ADJUSTMENT_LABEL[wording.adjustment]
  return pairs.map((row, index) => {
    const words = {
      first: recipeName(row.first),
      second: recipeName(row.second),
      attribute: wording.name,
      higher: wording.higher,
    }
    return {
      ...row,
      adjustedP: adjustedT[index],
      wilcoxonAdjustedP: adjustedW[index],
      sentence: pairSentence(words, tResults[index], adjustedT[index], wording.alpha, label),
    }
  })
}
