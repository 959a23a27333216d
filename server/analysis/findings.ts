import { aggregateDense } from './aggregate.ts'
import { summarizeMean } from './describe.ts'
import { friedman } from './friedman.ts'
import { holm } from './holm.ts'
import { oneSampleT, type PairedTResult } from './paired.ts'
import { omnibusSentence, pairSentence } from './sentences.ts'
import type { Id, Interval, Rating, Reason } from './types.ts'
import { wilcoxonSignedRank } from './wilcoxon.ts'

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
  /** Level at which a Holm-adjusted difference is called clear (default 0.05). */
  alpha?: number
}

export interface RecipeMean {
  recipe: Id
  name: string
  /** Players who rated the recipe on this attribute. */
  n: number
  mean: number | null
  sd: number | null
  ci: Interval | null
  reason: Reason
}

export interface PairRow {
  first: Id
  second: Id
  /** Complete cases: players who rated both on this attribute. */
  n: number
  /** Players who rated this attribute but not both recipes. */
  dropped: number
  /** Mean of second − first, with its 95% CI. */
  difference: number | null
  ci: Interval | null
  t: number | null
  df: number | null
  p: number | null
  holmP: number | null
  wilcoxonV: number | null
  wilcoxonP: number | null
  wilcoxonMethod: 'exact' | 'normal' | null
  wilcoxonHolmP: number | null
  dz: number | null
  rankBiserial: number | null
  sentence: string
  reason: Reason
}

export interface OmnibusLine {
  test: 'friedman'
  /** Players with every recipe (that anyone rated) rated. */
  n: number
  dropped: number
  /** Recipes that entered the test. */
  recipes: Id[]
  chiSquare: number | null
  df: number | null
  p: number | null
  kendallW: number | null
  rankSums: number[]
  sentence: string
  reason: Reason
}

export interface AttributeFindings {
  attribute: Id
  name: string
  /** Players with at least one rating on this attribute. */
  players: number
  recipes: RecipeMean[]
  pairs: PairRow[]
  omnibus: OmnibusLine
}

export interface Findings {
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

  const attributes = data.attributes.map((attribute, a) => {
    const info = attributeInfo.get(attribute)
    return attributeFindings(attribute, data.dense[a], data.recipes, recipeName, {
      name: info?.name ?? String(attribute),
      higher: info?.higher,
      alpha,
    })
  })
  return {
    players: data.players.length,
    ratings: ratings.length - data.ignored,
    ignored: data.ignored,
    excludedPlayers: excluded.size,
    attributes,
    reason: data.players.length === 0 ? 'not enough data' : null,
  }
}

function nameLookup(recipes: readonly RecipeInfo[] | undefined) {
  const names = new Map((recipes ?? []).map((r) => [r.id, r.name]))
  return (id: Id) => names.get(id) ?? String(id)
}

interface Wording {
  name: string
  higher?: string
  alpha: number
}

function attributeFindings(
  attribute: Id,
  dense: Float64Array,
  recipes: Id[],
  recipeName: (id: Id) => string,
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
    return { recipe, name: recipeName(recipe), ...summarizeMean(values) }
  })

  const pairs: Omit<PairRow, 'holmP' | 'wilcoxonHolmP' | 'sentence'>[] = []
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
  // Holm within this attribute's family of pairs, once for each test.
  const holmT = holm(pairs.map((p) => p.p))
  const holmW = holm(pairs.map((p) => p.wilcoxonP))
  const pairRows: PairRow[] = pairs.map((row, index) => {
    const words = {
      first: recipeName(row.first),
      second: recipeName(row.second),
      attribute: wording.name,
      higher: wording.higher,
    }
    return {
      ...row,
      holmP: holmT[index],
      wilcoxonHolmP: holmW[index],
      sentence: pairSentence(words, tResults[index], holmT[index], wording.alpha),
    }
  })

  return {
    attribute,
    name: wording.name,
    players: active.length,
    recipes: recipeMeans,
    pairs: pairRows,
    omnibus: omnibus(active, recipes, recipeMeans, wording.name),
  }
}

function omnibus(
  active: Float64Array[],
  recipes: Id[],
  recipeMeans: RecipeMean[],
  attribute: string,
): OmnibusLine {
  // A recipe nobody rated would empty every block; it is left out of the overall test.
  const columns = recipeMeans.flatMap((m, c) => (m.n > 0 ? [c] : []))
  const rows: number[][] = []
  for (const row of active) {
    if (columns.every((c) => !Number.isNaN(row[c]))) rows.push(columns.map((c) => row[c]))
  }
  const result = columns.length >= 3 ? friedman(rows) : friedman([])
  const reason = columns.length < 3 ? 'fewer than three recipes' : result.reason
  const dropped = active.length - rows.length
  const f = { ...result, reason }
  return {
    test: 'friedman',
    n: rows.length,
    dropped,
    recipes: columns.map((c) => recipes[c]),
    chiSquare: f.chiSquare,
    df: f.df,
    p: f.p,
    kendallW: f.kendallW,
    rankSums: f.rankSums,
    sentence: omnibusSentence(attribute, f, dropped),
    reason,
  }
}
