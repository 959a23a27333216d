import type { TriangleOrder } from './triangle.ts'

/** Identifiers come from the database (numbers) or from files (strings). */
export type Id = string | number

export type SessionFormat = 'pair' | 'rating' | 'triangle' | 'playtest'

export interface DesignClip {
  recipeId: Id
  clipId: Id
}

/** Clips of one excerpt recorded in matched conditions: only the string differs. */
export interface DesignClipSet {
  excerptKey: string
  clips: DesignClip[]
  /**
   * Second takes: another recording of a recipe in this set, served where a trial holds that
   * recipe twice (a triangle's twin, a hidden repeat), so the two servings are not one file.
   * At most one per recipe; never rated as a first showing.
   */
  twins?: DesignClip[]
}

/** What a session's plans are dealt from: the same input always deals the same plans. */
export interface SessionDesignInput {
  format: SessionFormat
  recipes: Id[]
  clipSets: DesignClipSet[]
  /** Hidden duplicates per player. */
  duplicates: number
  seed: string
}

/** A clip as served: the code is all a player may see. */
export interface BlindClip {
  clipId: Id
  recipeId: Id
  code: number
}

interface TrialBase {
  /** Index of the trial in the same plan that this one repeats; null for a first showing. */
  repeatOf: number | null
}

export interface RatingTrialPlan extends TrialBase {
  kind: 'rating'
  excerptKey: string
  clip: BlindClip
}

export interface PairTrialPlan extends TrialBase {
  kind: 'pair'
  excerptKey: string
  a: BlindClip
  b: BlindClip
}

export interface TriangleTrialPlan extends TrialBase {
  kind: 'triangle'
  excerptKey: string
  order: TriangleOrder
  samples: [BlindClip, BlindClip, BlindClip]
  odd: 0 | 1 | 2
}

export interface PlaytestTrialPlan extends TrialBase {
  kind: 'playtest'
  recipeId: Id
  code: number
}

export type PlannedTrial = RatingTrialPlan | PairTrialPlan | TriangleTrialPlan | PlaytestTrialPlan

export interface PlayerPlan {
  playerIndex: number
  format: SessionFormat
  trials: PlannedTrial[]
}
