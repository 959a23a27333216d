import {
  pairedTSampleSize,
  signTestSampleSize,
  triangleMinimumCorrect,
  triangleSampleSize,
  type SampleSizePlan,
} from '../analysis/index.ts'

export type { SampleSizePlan }

export interface DifferencePlanInput {
  /** Smallest difference between two recipes worth finding, in rating points. */
  difference: number
  /** Expected SD of one player's difference between the two recipes. */
  sd: number
  alpha?: number
  power?: number
}

/** Players needed for a two-sided paired t-test to find `difference` (rating sessions). */
export function playersForDifference(input: DifferencePlanInput): SampleSizePlan {
  return pairedTSampleSize(input)
}

export interface PreferencePlanInput {
  /** Expected share of players preferring the favoured recipe, e.g. 0.7. */
  share: number
  alpha?: number
  power?: number
}

/** Players needed for a two-sided sign test to show a preference share (pair sessions). */
export function playersForPreference(input: PreferencePlanInput): SampleSizePlan {
  return signTestSampleSize(input)
}

export interface TrianglePlanningInput {
  /** Proportion of discriminators worth detecting, 0–1. */
  pd: number
  alpha?: number
  power?: number
}

/** Answers needed for a triangle test to detect `pd` (one answer per player and pair). */
export function playersForTriangle(input: TrianglePlanningInput): SampleSizePlan {
  return triangleSampleSize(input)
}

/** Fewest correct answers out of `players` that show a difference (one-sided, p0 = 1/3). */
export function triangleCriterion(players: number, alpha = 0.05): number | null {
  return triangleMinimumCorrect(players, alpha)
}

/**
 * The panel size to invite: the statistical need rounded up to whole blocks, because a
 * half-dealt block leaves some orders, and so some carry-over, over-represented.
 */
export function roundUpToBlock(players: number, block: number): number {
  return Math.ceil(players / block) * block
}
