import type { SessionStatus } from '../sessions/design'
import type { FindingsReason, Interval } from './common'

// The time trend of an aging study.
// Staff only: recipes appear by id and name here, so nothing in this file may ever reach a
// player's screen.

export interface AgingPoint {
  sessionId: number
  label: string
  n: number
  mean: number | null
  ci: Interval | null
  reason: FindingsReason
}

/** One recipe's change from the first time point to a later one; `difference` is later − first. */
export interface AgingChange {
  recipeId: number
  name: string
  from: string
  to: string
  n: number
  difference: number | null
  ci: Interval | null
  t: number | null
  df: number | null
  p: number | null
  adjustedP: number | null
  /** Wilcoxon signed-rank on the same players' changes, as the recipe pairs. */
  wilcoxonV: number | null
  wilcoxonP: number | null
  wilcoxonMethod: 'exact' | 'normal' | null
  wilcoxonAdjustedP: number | null
  dz: number | null
  /** Matched-pairs rank-biserial correlation of the changes. */
  rankBiserial: number | null
  sentence: string
  reason: FindingsReason
}

export interface AgingFindings {
  timePoints: { sessionId: number; label: string; status: SessionStatus }[]
  attributes: {
    attribute: string
    name: string
    series: { recipeId: number; name: string; points: AgingPoint[] }[]
    changes: AgingChange[]
  }[]
}
