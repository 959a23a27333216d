import { friedman } from './friedman.ts'
import { omnibusSentence } from './sentences.ts'
import type { Id, Reason } from './types.ts'

// The overall test of one attribute across all recipes: Friedman, with Kendall's W.

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

export function omnibus(
  active: readonly Float64Array[],
  recipes: readonly Id[],
  recipeMeans: readonly { n: number }[],
  attribute: string,
): OmnibusLine {
  // A recipe nobody rated would empty every block; it is left out of the overall test.
  const columns = recipeMeans.flatMap((m, c) => (m.n > 0 ? [c] : []))
  const rows: number[][] = []
  for (const row of active) {
    if (columns.every((c) => !Number.isNaN(row[c]))) rows.push(columns.map((c) => row[c]))
  }
  const result = columns.length >= 3 ? friedman(rows) : friedman([])
  const reason: Reason =
    recipes.length < 3
      ? 'fewer than three recipes'
      : active.length === 0
        ? 'nobody rated this attribute'
        : columns.length < 3
          ? 'fewer than three recipes rated'
          : result.reason
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
    sentence: omnibusSentence(attribute, f, dropped, columns.length),
    reason,
  }
}
