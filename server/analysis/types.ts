/**
 * Shared shapes for the statistics engine. Every result carries `reason` so that callers can
 * show why a figure is missing instead of guessing from a null.
 */

/** Identifiers come from the database (numbers) or from files (strings). */
export type Id = string | number

/** Why a result could not be computed; null when it could. */
export type Reason =
  'not enough data' | 'no variance' | 'no finite estimate' | 'fewer than three recipes' | null

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
