import type { CorrelatedMeasureName } from '../../measures'
import type { FindingsReason } from './common'

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
  n: number
  reason: FindingsReason
  /** One point per clip: the measure against the panel's mean rating of that clip. */
  points: { x: number; y: number; clipId: number; recipeId: number }[]
}
