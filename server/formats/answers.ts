import type { PlannedTrial } from '../design/index.ts'
import { formatOf } from './index'
import type { AnswerRules, GivenAnswer } from './types'

// Answers of any format, handed to the module of their kind.

/** The recordings a trial serves, in the order of their places on screen. */
export const servingsOf = (trial: PlannedTrial) => formatOf(trial.kind).servings(trial)

/**
 * Why an answer does not fit the trial it is saved for, field by field; empty when it fits.
 */
export function answerProblems(
  trial: PlannedTrial,
  answer: GivenAnswer,
  rules: AnswerRules,
): Record<string, string[]> {
  const problems: Record<string, string[]> = {}
  const add = (field: string, message: string) => (problems[field] ??= []).push(message)
  if (answer.kind !== trial.kind) {
    add('answer.kind', `This trial takes a ${trial.kind} answer, not a ${answer.kind} one`)
    return problems
  }
  formatOf(trial.kind).check(trial, answer, rules, add)
  return problems
}

/** Record keys in a fixed order, so "the same answer again" compares equal as text. */
export const canonicalAnswer = (answer: GivenAnswer): GivenAnswer =>
  formatOf(answer.kind).canonical(answer)
