import type { z } from 'zod'
import type { BlindClip, PlannedTrial, SessionCodes, SessionDesignInput } from '../design/index.ts'
import type { ResolvedAnswers } from '../findings/answersToRatings'
import type { trialAnswer } from '../../shared/schemas/rating'
import type { SessionFormat } from '../../shared/schemas/sessions'

// What a session format is, in one place: how its trials are planned and coded, what a trial
// serves, which answers fit it, how an answer is stored and how it reaches the findings.
// Each format is one module in this folder, registered in index.ts.

/**
 * attributes: per-attribute means and pair tests of line-scale ratings; preferences: sign tests
 * and the preference scale; triangle: correct answers against the triangle table; objective:
 * clip measures against ratings; aging: change across time points.
 */
export type FindingsSection = 'attributes' | 'preferences' | 'triangle' | 'objective' | 'aging'

export type GivenAnswer = z.output<typeof trialAnswer>
export type TrialOf<K extends SessionFormat> = Extract<PlannedTrial, { kind: K }>
export type AnswerOf<K extends SessionFormat> = Extract<GivenAnswer, { kind: K }>

/** The session's rules an answer is checked against. */
export interface AnswerRules {
  attributeKeys: readonly string[]
  allowNoPreference: boolean
}

/** Server-side facts about an answer that findings need, stored beside the blind answer. */
export interface ResolvedFacts {
  /** Pair: the recipe preferred, null for "no preference". */
  preferredRecipeId?: number | null
  /** Pair: attribute key → recipe heard as having more of it. */
  moreRecipeIds?: Record<string, number>
  /** Triangle: whether the odd sample was found. */
  correct?: boolean
}

/** What every row of the long answer export shares for one stored answer. */
export interface AnswerContext {
  player: string | number
  trial: number
  repeatOf: number | null
  /**
   * The stimulus this trial shows: its clips, or for a hidden repeat its first showing's, so a
   * repeat played from a second take is still paired with what it repeats.
   */
  item: string
  kind: SessionFormat
  answeredAt: string
  comment: string
}

/** Adds a problem found in an answer at a field path (`answer.values.warmth`). */
export type AddProblem = (field: string, message: string) => void

export interface FormatModule<K extends SessionFormat = SessionFormat> {
  kind: K
  /** The shape of an answer, as the player's browser sends it (shared/schemas/rating.ts). */
  answer: z.ZodType<AnswerOf<K>, unknown>
  /** Fewest recipes a session of this format can compare. */
  minRecipes: number
  /**
   * How clips make up the matched sets: none (physical sets are played), exactly one clip of
   * every recipe per set (recipes are compared within a set), or any of them (rated alone).
   */
  clipSets: 'none' | 'one-of-each' | 'any'
  /** Whether players rate the session's attributes (a triangle only asks for the odd one). */
  ratesAttributes: boolean
  /** The parts of the findings this format's answers feed (see server/findings/service.ts). */
  findings: readonly FindingsSection[]
  /** Whether the session may let players answer "no preference". */
  noPreferenceOption: boolean
  /** What a blind code stands for, and how many showings one item needs in a first pass. */
  codes: { of: 'clip' | 'set'; showings: number }
  /** The cautions players read before they start. */
  cautions: readonly string[]
  /** Players that complete one balanced block of this format's order design. */
  balancedBlock(recipes: number): number
  /** Player `playerIndex`'s trials in serving order, coded; the design is already valid. */
  plan(input: SessionDesignInput, playerIndex: number, codes: SessionCodes): TrialOf<K>[]
  /** The recordings a trial serves, in the order of their places on screen. */
  servings(trial: TrialOf<K>): BlindClip[]
  /** The play-test set code of a trial; null where recordings are played. */
  setCode(trial: TrialOf<K>): number | null
  /**
   * The matched set a first showing may share a screen with (rated side by side, so players
   * can switch); null for a trial that stands alone on its screen.
   */
  screenGroup(trial: TrialOf<K>): string | null
  /** Field problems of an answer of this format for this trial; nothing added when it fits. */
  check(trial: TrialOf<K>, answer: AnswerOf<K>, rules: AnswerRules, add: AddProblem): void
  /** The answer with record keys in a fixed order, so the same answer compares equal as text. */
  canonical(answer: AnswerOf<K>): AnswerOf<K>
  /** The recipes behind the codes the answer names. */
  resolve(trial: TrialOf<K>, answer: AnswerOf<K>): ResolvedFacts
  /**
   * Adds the answer to the findings' inputs (ratings, preferences, triangles, export rows);
   * false when the answer names nothing this trial served.
   */
  collect(
    out: ResolvedAnswers,
    trial: TrialOf<K>,
    answer: AnswerOf<K>,
    context: AnswerContext,
    attributes: readonly string[],
  ): boolean
  /** Reads an answer stored by position before answers were kept in codes; null if none. */
  olderAnswer?(record: Record<string, unknown>, trial: TrialOf<K>): unknown
}
