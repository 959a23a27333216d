import { mixedModel, type MixedModelRating } from './mixedModel.ts'
import type { Id, Interval } from './types.ts'

// The mixed model as the findings page shows it: its formula in words, the pairs in the pair
// table's direction (second − first), and whether the fit is singular.

export interface MixedModelSummary {
  formula: string
  n: number
  players: number
  variance: { player: number; playerRecipe: number | null; residual: number } | null
  /** lme4's REML criterion. */
  reml: number | null
  /**
   * A variance component at 0 (lme4 calls the fit singular): the model then counts repeats as
   * if they came from separate players, and its p-values deserve less trust than the pairs'.
   */
  singular: boolean
  test: { f: number; numDf: number; denDf: number; p: number } | null
  means: {
    recipe: Id
    estimate: number | null
    se: number | null
    df: number | null
    ci: Interval | null
  }[]
  contrasts: {
    first: Id
    second: Id
    estimate: number | null
    se: number | null
    df: number | null
    t: number | null
    /** Tukey-adjusted over the recipes' pairs; null below 2 df, as R gives NaN. */
    p: number | null
    pUnadjusted: number | null
  }[]
  reason: string | null
}

export function attributeMixedModel(
  ratings: readonly MixedModelRating[],
  recipes: readonly Id[],
): MixedModelSummary {
  const listed = new Set(recipes.map(String))
  const m = mixedModel(
    ratings.filter((r) => listed.has(String(r.recipe))),
    recipes,
  )
  const repeated = m.terms.includes('player:recipe')
  const v = m.variance
  const variance =
    v.player !== null && v.residual !== null
      ? { player: v.player, playerRecipe: repeated ? v.playerRecipe : null, residual: v.residual }
      : null
  const atZero = (x: number | null) =>
    x !== null && variance !== null && x <= 1e-10 * variance.residual
  const t = m.recipeTest
  return {
    formula: repeated
      ? 'rating ~ recipe + (1 | player) + (1 | player:recipe)'
      : 'rating ~ recipe + (1 | player)',
    n: m.n,
    players: m.players,
    variance,
    reml: v.remlCriterion,
    singular: variance !== null && (atZero(variance.player) || atZero(variance.playerRecipe)),
    test:
      t.f !== null && t.numDf !== null && t.denDf !== null && t.p !== null
        ? { f: t.f, numDf: t.numDf, denDf: t.denDf, p: t.p }
        : null,
    means: m.means.map((e) => ({
      recipe: e.recipe,
      estimate: e.estimate,
      se: e.se,
      df: e.df,
      ci: e.ci,
    })),
    contrasts: m.contrasts.map((c) => ({
      first: c.recipeA,
      second: c.recipeB,
      estimate: c.estimate === null ? null : -c.estimate,
      se: c.se,
      df: c.df,
      t: c.t === null ? null : -c.t,
      p: c.pTukey,
      pUnadjusted: c.p,
    })),
    reason: m.reason,
  }
}
