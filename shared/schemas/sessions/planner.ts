import { z } from 'zod'

// The panel-size planner: what a difference needs in players, per format.

const level = (fallback: number) => z.coerce.number().gt(0).lt(1).default(fallback)

export const plannerQuery = z.object({
  difference: z.coerce.number().positive('Above 0').max(100).default(10),
  sd: z.coerce.number().positive('Above 0').max(100).default(15),
  alpha: level(0.05),
  power: level(0.8),
  share: z.coerce.number().gt(0.5, 'Above 0.5').lt(1, 'Below 1').default(0.7),
  pd: z.coerce.number().gt(0, 'Above 0').max(1, 'At most 1').default(0.3),
  /** Answers the triangle criterion is shown for; defaults to the panel's size. */
  n: z.coerce.number().int().min(1).max(100_000).optional(),
})
export type PlannerQuery = z.input<typeof plannerQuery>
export type PlannerParams = z.output<typeof plannerQuery>

export interface PlannerResult {
  pairedT: { players: number | null; power: number | null }
  signTest: { players: number | null; power: number | null }
  triangle: {
    players: number | null
    power: number | null
    /** Fewest correct answers out of `answers` that show a difference at alpha. */
    minimumCorrect: number | null
    answers: number
  }
  panelSize: number
}
