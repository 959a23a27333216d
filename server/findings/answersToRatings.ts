import type { Id, PreferenceAnswer, Rating } from '../analysis/index.ts'
import type { PlannedTrial } from '../design/index.ts'
import { formatOf } from '../formats/index.ts'
import { servingsOf } from '../formats/answers'
import { readAnswer, UnreadableAnswer } from '../answers/stored'

/*
 * Players answer in blind codes; the findings need recipes. Each stored answer is turned back
 * into recipes through what that player was served (the served record), so nothing but the
 * record ever links a code to a recipe. Pure: no database here.
 */

/** One stored answer row of a player, as findings load it. */
export interface AnswerRow {
  id: number
  trialIndex: number
  payload: string
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
  /** The long-format rows, kept only for the answer export: the findings page never reads them,
   * and on a large panel building them cost more than all the statistics. */
  rows: LongRow[] | null
}

export const emptyResolved = (withRows = true): ResolvedAnswers => ({
  ratings: [],
  preferences: [],
  more: [],
  triangles: [],
  rows: withRows ? [] : null,
})

/** Appends one player's answers to `out`; `attributes` are the session's attribute keys. */
export function resolvePlayerAnswers(
  out: ResolvedAnswers,
  player: Id,
  trials: readonly PlannedTrial[],
  answers: readonly AnswerRow[],
  attributes: readonly string[],
): ResolvedAnswers {
  for (const stored of answers) {
    const trial = trials[stored.trialIndex]
    const answer = readAnswer(stored, trial)
    const shown = trial.repeatOf === null ? trial : (trials[trial.repeatOf] ?? trial)
    const context = {
      player,
      trial: stored.trialIndex,
      repeatOf: trial.repeatOf,
      item: servingsOf(shown)
        .map((c) => String(c.clipId))
        .join('+'),
      kind: trial.kind,
      answeredAt: stored.answeredAt,
      comment: '',
    }
    if (!formatOf(trial.kind).collect(out, trial, answer, context, attributes))
      throw new UnreadableAnswer(stored.id, 'it names nothing its trial served')
  }
  return out
}
