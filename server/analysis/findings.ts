import type { Adjustment } from './adjust.ts'
import { aggregateDense } from './aggregate.ts'
import { compactLetters } from './compactLetters.ts'
import { attributeHeadline } from './headline.ts'
import { summarizeMean } from './describe.ts'
import { interimLook, type InterimLook } from './interim.ts'
import { attributeMixedModel, type MixedModelSummary } from './mixedFindings.ts'
import type { MixedModelRating } from './mixedModel.ts'
import { omnibus, type OmnibusLine } from './omnibus.ts'
import { recipePairs, type PairRow, type Wording } from './recipePairs.ts'
import type { Id, Interval, Rating, Reason } from './types.ts'

// The findings of rated sessions, attribute by attribute: recipe means here, every recipe
// pair in recipePairs.ts and the test across all recipes in omnibus.ts.

export interface RecipeInfo {
  id: Id
  name: string
}

export interface AttributeInfo {
  id: Id
  name: string
  /** Comparative for a higher rating ("brighter", "warmer"), used in sentences. */
  higher?: string
}

export interface FindingsInput {
  ratings: readonly Rating[]
  /** Order and names; a listed recipe nobody rated still appears, with a reason. */
  recipes?: readonly RecipeInfo[]
  attributes?: readonly AttributeInfo[]
  /** Players the analyst excluded (their reasons are kept elsewhere). */
  excludedPlayers?: readonly Id[]
  /** Level at which an adjusted difference is called clear (default 0.05). */
  alpha?: number
  /** How each attribute's family of pairs is adjusted (default Holm). */
  adjustment?: Adjustment
  /** While a session runs: plan the players still needed, for this difference (null: seen). */
  interim?: { targetDifference: number | null } | null
}

export interface RecipeMean {
  recipe: Id
  name: string
  /** Players who rated the recipe on this attribute. */
  n: number
  mean: number | null
  sd: number | null
  ci: Interval | null
  /**
   * Compact letters: recipes sharing a letter are not found different by the paired t at the
   * session's α after its adjustment. Null for a recipe without a mean.
   */
  letters: string | null
  reason: Reason
}

export interface AttributeFindings {
  attribute: Id
  name: string
  /** Players with at least one rating on this attribute. */
  players: number
  /** The answer first: which recipes came out on top and whether the panel tells them apart. */
  headline: string
  recipes: RecipeMean[]
  pairs: PairRow[]
  omnibus: OmnibusLine
  /** Players still needed for the difference worth finding; null unless asked for. */
  interim: InterimLook | null
  /** Every rating, players as a random effect: the analysis that keeps incomplete players. */
  mixed: MixedModelSummary
}

export interface Findings {
  /** The adjustment every adjusted p in these findings went through. */
  adjustment: Adjustment
  players: number
  ratings: number
  /** Ratings left out: not a finite number. */
  ignored: number
  excludedPlayers: number
  attributes: AttributeFindings[]
  reason: Reason
}

/** Everything the findings page shows for rated sessions, from the raw long-format ratings. */
export function computeFindings(input: FindingsInput): Findings {
  const excluded = new Set(input.excludedPlayers ?? [])
  const ratings = excluded.size
    ? input.ratings.filter((r) => !excluded.has(r.player))
    : input.ratings
  const data = aggregateDense(ratings, {
    recipes: input.recipes?.map((r) => r.id),
    attributes: input.attributes?.map((a) => a.id),
  })
  const recipeName = nameLookup(input.recipes)
  const attributeInfo = new Map((input.attributes ?? []).map((a) => [a.id, a]))
  const alpha = input.alpha ?? 0.05
  const adjustment = input.adjustment ?? 'holm'

  // The mixed model reads the ratings themselves (repeats and all), attribute by attribute.
  const byAttribute = new Map<string, MixedModelRating[]>()
  for (const r of ratings) {
    if (!Number.isFinite(r.value)) continue
    const key = String(r.attribute)
    let list = byAttribute.get(key)
    if (!list) byAttribute.set(key, (list = []))
    list.push(r)
  }
  const attributes = data.attributes.map((attribute, a) => {
    const info = attributeInfo.get(attribute)
    const mixed = attributeMixedModel(byAttribute.get(String(attribute)) ?? [], data.recipes)
    return attributeFindings(attribute, data.dense[a], data.recipes, recipeName, mixed, {
      name: info?.name ?? String(attribute),
      higher: info?.higher,
      alpha,
      adjustment,
      interim: input.interim ?? null,
    })
  })
  return {
    adjustment,
    players: data.players.length,
    ratings: ratings.length - data.ignored,
    ignored: data.ignored,
    excludedPlayers: excluded.size,
    attributes,
    reason: data.players.length === 0 ? 'no answers' : null,
  }
}

function nameLookup(recipes: readonly RecipeInfo[] | undefined) {
  const names = new Map((recipes ?? []).map((r) => [r.id, r.name]))
  return (id: Id) => names.get(id) ?? String(id)
}

function attributeFindings(
  attribute: Id,
  dense: Float64Array,
  recipes: Id[],
  recipeName: (id: Id) => string,
  mixed: MixedModelSummary,
  wording: Wording,
): AttributeFindings {
  const k = recipes.length
  // Players with at least one rating here, as row views: the panel for this attribute.
  const active: Float64Array[] = []
  for (let offset = 0; offset < dense.length; offset += k) {
    const row = dense.subarray(offset, offset + k)
    if (row.some((v) => !Number.isNaN(v))) active.push(row)
  }

  const recipeMeans: RecipeMean[] = recipes.map((recipe, c) => {
    const values: number[] = []
    for (const row of active) if (!Number.isNaN(row[c])) values.push(row[c])
    return { recipe, name: recipeName(recipe), ...summarizeMean(values), letters: null }
  })

  const pairs = recipePairs(active, recipes, recipeName, wording)
  addLetters(recipeMeans, pairs, wording.alpha)
  const overall = omnibus(active, recipes, recipeMeans, wording.name)
  return {
    attribute,
    name: wording.name,
    players: active.length,
    headline: attributeHeadline(wording.name, recipeMeans),
    recipes: recipeMeans,
    pairs,
    omnibus: overall,
    interim: wording.interim
      ? interimLook(wording.name, pairs, overall.n, {
          targetDifference: wording.interim.targetDifference,
          alpha: wording.alpha,
        })
      : null,
    mixed,
  }
}

/** Letters over the recipes with a mean, highest mean first, so the top recipe carries "a". */
function addLetters(means: RecipeMean[], pairs: readonly PairRow[], alpha: number): void {
  const rated = means.filter((m) => m.mean !== null)
  rated.sort((x, y) => (y.mean as number) - (x.mean as number))
  const letters = compactLetters(
    rated.map((m) => m.recipe),
    pairs.map((p) => ({
      a: p.first,
      b: p.second,
      // A pair that could not be tested is not shown to differ.
      different: p.adjustedP !== null && p.adjustedP < alpha,
    })),
  )
  for (const m of rated) m.letters = letters.get(m.recipe) ?? null
}
