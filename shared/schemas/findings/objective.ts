import type { CorrelatedMeasureName } from '../../measures'
import type { FindingsReason, Interval } from './common'

// Clip measures against what the panel perceived.

/** A measure findings correlate with perception: see shared/measures.ts. */
export type ClipMeasureName = CorrelatedMeasureName

export interface ObjectiveRow {
  measure: ClipMeasureName
  unit: string
  attribute: string
  name: string
  rho: number | null
  p: number | null
  /** Pearson's r with its p and Fisher-z 95% interval (null below four clips). */
  pearsonR: number | null
  pearsonP: number | null
  pearsonCi: Interval | null
  n: number
  reason: FindingsReason
  /** One point per clip: the measure against the panel's mean rating of that clip. */
  points: { x: number; y: number; clipId: number; recipeId: number }[]
}
