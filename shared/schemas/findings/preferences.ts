import type { FindingsReason, Interval } from './common'

// Pair-session findings: preferences, "which has more" and the preference scale.
// Staff only: recipes appear by id and name here, so nothing in this file may ever reach a
// player's screen.

export interface SignTest {
  successes: number
  n: number
  estimate: number | null
  p: number | null
  ci: Interval | null
  ties: number
  reason: FindingsReason
}

export interface PreferencePair {
  first: number
  second: number
  firstPreferred: number
  secondPreferred: number
  noPreference: number
  test: SignTest
  adjustedP: number | null
  sentence: string
}

export interface ScaleAbility {
  item: number
  name: string
  /** Null when the scale could not be fitted (the scale's reason says why). */
  logAbility: number | null
  se: number | null
  wins: number
  comparisons: number
}

/** Bradley–Terry: log abilities against the first recipe, and modelled win chances. */
export interface PreferenceScale {
  items: number[]
  reference: number | null
  abilities: ScaleAbility[]
  winProbability: number[][] | null
  converged: boolean
  reason: FindingsReason
}

/** "Which has more <attribute>?" for one pair: counts and a sign test. */
export interface MorePair {
  first: number
  second: number
  firstMore: number
  secondMore: number
  test: SignTest
  adjustedP: number | null
  sentence: string
}

export interface PreferenceFindings {
  /** Choices that named a side or "no preference". */
  answers: number
  pairs: PreferencePair[]
  scale: PreferenceScale
  attributes: { attribute: string; name: string; pairs: MorePair[] }[]
}
