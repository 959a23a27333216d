import type { FindingsReason, Interval } from './common'

// Findings about the panel: the odd-one-out count and each player's reliability.

export interface TriangleFindings {
  correct: number
  n: number
  p: number | null
  minimumCorrect05: number | null
  minimumCorrect01: number | null
  pd: number | null
  pdCi: Interval | null
  /** Thurstonian d′ from the share correct (0 at guessing; null when every answer was right). */
  dPrime: number | null
  /** Through the exact interval of the share; the upper end is null when it has no bound. */
  dPrimeCi: { lower: number; upper: number | null } | null
  dPrimeSentence: string
  /** Answers to hidden repeats, set aside: a repeat is not a new, independent judgement. */
  repeatsSetAside: number
  verdict: string
  reason: FindingsReason
}

export interface PlayerReliabilityRow {
  playerCode: string
  duplicatePairs: number
  misses: number
  missShare: number | null
  /** Spearman rho of the player's recipe means against the rest of the panel's. */
  looSpearman: number | null
  flagged: boolean
  excluded: boolean
  exclusionReason: string | null
  /** The headphone check failed; the player is left out unless an analyst took them back. */
  headphoneFailed: boolean
  reason: FindingsReason
}

export interface ReliabilityFindings {
  rule: string
  players: PlayerReliabilityRow[]
}
