/**
 * Shared shapes for the statistics engine. Every result carries `reason` so that callers can
 * show why a figure is missing instead of guessing from a null.
 */

/** Identifiers come from the database (numbers) or from files (strings). */
export type Id = string | number

/**
 * Why a result could not be computed, in words a reader can act on; null when it could. Each
 * path that gives up names its own cause: tables and exports show the phrase as it is.
 */
export type Reason =
  // A recipe's mean on one attribute.
  | 'nobody rated it'
  | 'only one player rated it'
  // A pair of recipes (or of time points).
  | 'no player rated both'
  | 'only one player rated both'
  // The test across recipes.
  | 'nobody rated this attribute'
  | 'fewer than three recipes'
  | 'fewer than three recipes rated'
  | 'fewer than two players rated every recipe'
  // Counts of answers.
  | 'no answers'
  | 'every answer was no preference'
  // The preference scale.
  | 'fewer than two recipes'
  | 'a recipe was never compared'
  | 'some recipes won every comparison with the rest'
  | 'did not converge'
  // Planning.
  | 'no difference to detect'
  | 'more than 100,000 players needed'
  // Reliability.
  | 'too few hidden duplicates'
  // Correlations.
  | 'fewer than three pairs'
  | 'no line-scale ratings from this player'
  // Anywhere.
  | 'no variance'
  | 'no finite estimate'
  | null

export type Alternative = 'two-sided' | 'less' | 'greater'

export interface Interval {
  lower: number
  upper: number
}

/** One answer on a line scale, as stored: several may exist per player, recipe and attribute. */
export interface Rating {
  player: Id
  recipe: Id
  attribute: Id
  /** 0–100 on the attribute's line scale. */
  value: number
  /** The clip (or coded set) the answer was given for; lets reliability find hidden duplicates. */
  clip?: Id
  /**
   * The stimulus rated, where it is not the clip: a hidden repeat played from a second take
   * rates its first showing's item again. Reliability pairs ratings of one item.
   */
  item?: Id
}
