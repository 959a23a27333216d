import type { FindingsReason, Interval } from './common'

// Line-scale findings (attribute rating and play-test): means, recipe pairs, omnibus test.
// Staff only: recipes appear by id and name here, so nothing in this file may ever reach a
// player's screen.

export interface RecipeMean {
  /** Recipes sharing a letter are not found different (paired t, the session's adjustment). */
  letters: string | null
  recipe: number
  name: string
  n: number
  mean: number | null
  sd: number | null
  ci: Interval | null
  reason: FindingsReason
}

/** One recipe pair on one attribute; `difference` is second − first. */
export interface PairRow {
  first: number
  second: number
  n: number
  dropped: number
  difference: number | null
  /** SD of the players' differences: what planning more players starts from. */
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
  reason: FindingsReason
}

export interface OmnibusLine {
  test: 'friedman'
  n: number
  dropped: number
  recipes: number[]
  chiSquare: number | null
  df: number | null
  p: number | null
  kendallW: number | null
  rankSums: number[]
  sentence: string
  reason: FindingsReason
}

export interface AttributeFindings {
  /** The attribute's key in the session. */
  attribute: string
  name: string
  /** End labels of the line scale, for axis captions. */
  low: string
  high: string
  players: number
  /** The answer first: which recipes came out on top and whether the panel tells them apart. */
  headline: string
  recipes: RecipeMean[]
  pairs: PairRow[]
  omnibus: OmnibusLine
  /** While the session runs: players still needed for the difference worth finding. */
  interim: InterimLook | null
  /** rating ~ recipe + (1 | player) [+ (1 | player:recipe)], REML, Satterthwaite df. */
  mixed: MixedModelFindings
}

export interface MixedModelFindings {
  formula: string
  n: number
  players: number
  variance: { player: number; playerRecipe: number | null; residual: number } | null
  reml: number | null
  /** A variance component at 0: the model's p-values lean on repeats, trust them less. */
  singular: boolean
  test: { f: number; numDf: number; denDf: number; p: number } | null
  means: {
    recipe: number
    estimate: number | null
    se: number | null
    df: number | null
    ci: Interval | null
  }[]
  /** second − first; p Tukey-adjusted over the recipes' pairs. */
  contrasts: {
    first: number
    second: number
    estimate: number | null
    se: number | null
    df: number | null
    t: number | null
    p: number | null
    pUnadjusted: number | null
  }[]
  reason: string | null
}

/** The interim look at one attribute: a plan for more players, never advice to stop. */
export interface InterimLook {
  complete: number
  difference: number | null
  differenceSource: 'design' | 'observed' | null
  sd: number | null
  alphaPerPair: number | null
  pairs: number
  targetPower: number
  powerNow: number | null
  needed: number | null
  more: number | null
  sentence: string
  reason: FindingsReason
}
