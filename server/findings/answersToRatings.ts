import type { Id, PreferenceAnswer, Rating } from '../analysis/index.ts'
import type { PlannedTrial } from '../design/index.ts'
import { trialAnswer } from '../../shared/schemas/rating'
import { formatOf, type GivenAnswer } from '../formats/index.ts'

/*
 * Players answer in blind codes; the findings need recipes. Each stored answer is turned back
 * into recipes through the player's own plan (rebuilt from the session seed), so nothing but
 * the plan ever links a code to a recipe. Pure: no database here.
 */

/**
 * The answer inside a stored payload. The answer service may store the bare answer or wrap it
 * with bookkeeping as `{ given, … }`; both read the same. Anything that is not a valid answer
 * gives null and is counted as unreadable rather than guessed at.
 */
export function readAnswer(payload: unknown): GivenAnswer | null {
  let value = payload
  if (typeof value === 'string') {
    try {
      value = JSON.parse(value)
    } catch {
      return null
    }
  }
  if (value && typeof value === 'object' && 'given' in value) value = value.given
  const parsed = trialAnswer.safeParse(value)
  return parsed.success ? parsed.data : null
}

export interface StoredAnswer {
  trialIndex: number
  payload: unknown
  answeredAt: string
}

/** "Which of the two has more <attribute>?", resolved to recipes. */
export interface MoreAnswer {
  player: Id
  attribute: string
  first: Id
  second: Id
  more: Id
}

export interface TriangleAnswer {
  player: Id
  correct: boolean
  repeat: boolean
}

/** One row of the long-format answer export: player × trial × attribute. */
export interface LongRow {
  player: Id
  trial: number
  repeatOf: number | null
  kind: PlannedTrial['kind']
  excerpt: string
  /** Attribute key, or "preference" / "odd one out" for the choice itself. */
  attribute: string
  codes: number[]
  recipes: Id[]
  answerCode: number | null
  answerRecipe: Id | null
  value: number | null
  comment: string
  answeredAt: string
}

export interface ResolvedAnswers {
  ratings: Rating[]
  preferences: PreferenceAnswer[]
  more: MoreAnswer[]
  triangles: TriangleAnswer[]
  rows: LongRow[]
  unreadable: number
}

export const emptyResolved = (): ResolvedAnswers => ({
  ratings: [],
  preferences: [],
  more: [],
  triangles: [],
  rows: [],
  unreadable: 0,
})

/** Appends one player's answers to `out`; `attributes` are the session's attribute keys. */
export function resolvePlayerAnswers(
  out: ResolvedAnswers,
  player: Id,
  trials: readonly PlannedTrial[],
  answers: readonly StoredAnswer[],
  attributes: readonly string[],
): ResolvedAnswers {
  for (const stored of answers) {
    const trial = trials[stored.trialIndex]
    const answer = readAnswer(stored.payload)
    if (!trial || !answer || answer.kind !== trial.kind) {
      out.unreadable++
      continue
    }
    const context = {
      player,
      trial: stored.trialIndex,
      repeatOf: trial.repeatOf,
      kind: trial.kind,
      answeredAt: stored.answeredAt,
      comment: '',
    }
    if (!formatOf(trial.kind).collect(out, trial, answer, context, attributes)) out.unreadable++
  }
  return out
}
