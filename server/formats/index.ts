import {
  checkDesign,
  dealCodes,
  DesignError,
  type PlannedTrial,
  type PlayerPlan,
  type SessionCodes,
  type SessionDesignInput,
} from '../design/index.ts'
import { SESSION_FORMATS, type SessionFormat } from '../../shared/schemas/sessions'
import { pairFormat } from './pair'
import { playtestFormat } from './playtest'
import { ratingFormat } from './rating'
import { triangleFormat } from './triangle'
import type { FormatModule } from './types'

// The registry of session formats. A new format is one module beside these (see types.ts for
// what it states), one entry here, its name in SESSION_FORMATS and its answer schema in
// shared/schemas/rating.ts, and its player screen in src/player/formatScreens.ts.

export const FORMATS: { readonly [K in SessionFormat]: FormatModule<K> } = {
  pair: pairFormat,
  rating: ratingFormat,
  triangle: triangleFormat,
  playtest: playtestFormat,
}

/**
 * The module of a format, typed for callers that handle any format: each module's methods
 * accept only its own trials and answers, which callers check by `kind` first.
 */
export function formatOf(kind: SessionFormat): FormatModule {
  const module = (FORMATS as Record<string, FormatModule<SessionFormat> | undefined>)[kind]
  if (!module || !SESSION_FORMATS.includes(kind))
    throw new DesignError(`Unknown session format "${kind}"`)
  return module as unknown as FormatModule
}

/** Refuses a design that would give some player a broken plan, before anything is drawn. */
export function validateDesign(input: SessionDesignInput): void {
  checkDesign(input, formatOf(input.format))
}

/**
 * The session's blind codes, drawn once from its seed. A code belongs to a clip (or set) and a
 * showing, so a clip shows the same code to every player all session long.
 */
export function sessionCodes(input: SessionDesignInput): SessionCodes {
  validateDesign(input)
  return dealCodes(input, formatOf(input.format).codes)
}

/**
 * Player `playerIndex`'s trials in the order they are served, with blind codes; the same seed
 * and index always give the same plan. Pass `codes` when building many plans to draw them once.
 */
export function buildPlayerPlan(
  input: SessionDesignInput,
  playerIndex: number,
  codes: SessionCodes = sessionCodes(input),
): PlayerPlan {
  validateDesign(input)
  if (!Number.isInteger(playerIndex) || playerIndex < 0) {
    throw new DesignError(`A player index must be a whole number from 0, got ${playerIndex}`)
  }
  const trials: PlannedTrial[] = formatOf(input.format).plan(input, playerIndex, codes)
  return { playerIndex, format: input.format, trials }
}

/** Plans for players 0…players−1, sharing one code map. */
export function buildSessionPlans(input: SessionDesignInput, players: number): PlayerPlan[] {
  const codes = sessionCodes(input)
  return Array.from({ length: players }, (_, i) => buildPlayerPlan(input, i, codes))
}

/** Players that complete one balanced block of the format's order design. */
export function balancedBlock(format: SessionFormat, recipes: number): number {
  return formatOf(format).balancedBlock(recipes)
}

export type { AnswerRules, FormatModule, GivenAnswer, ResolvedFacts } from './types'
