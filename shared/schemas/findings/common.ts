// What every findings table shares. Staff only: recipes appear by id and name here, so
// nothing in this file may ever reach a player's screen.

/** Why a figure is missing: the engine's reasons, shown as they are. */
export type FindingsReason = string | null

export interface Interval {
  lower: number
  upper: number
}

export interface RecipeRef {
  id: number
  name: string
}
