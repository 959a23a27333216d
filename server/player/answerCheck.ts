import type { z } from 'zod'
import type { PlannedTrial } from '../design/index.ts'
import type { trialAnswer } from '../../shared/schemas/rating'

export type GivenAnswer = z.output<typeof trialAnswer>

export interface AnswerRules {
  attributeKeys: readonly string[]
  allowNoPreference: boolean
}

const servedCodes = (t: PlannedTrial): number[] =>
  t.kind === 'rating'
    ? [t.clip.code]
    : t.kind === 'pair'
      ? [t.a.code, t.b.code]
      : t.kind === 'triangle'
        ? t.samples.map((s) => s.code)
        : [t.code]

/**
 * Why an answer does not fit the trial it is saved for, field by field; empty when it fits.
 * Codes must be this trial's, so an answer meant for another trial (or another player) is
 * refused rather than counted against the wrong recording.
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
  const codes = servedCodes(trial)
  const known = new Set(rules.attributeKeys)
  const checkKeys = (field: string, keys: string[]) => {
    for (const key of keys) if (!known.has(key)) add(`${field}.${key}`, 'Not rated in this session')
  }
  const checkCode = (field: string, code: number) => {
    if (!codes.includes(code)) add(field, `Code ${code} is not one of this trial's recordings`)
  }

  switch (answer.kind) {
    case 'rating':
    case 'playtest':
      if (Object.keys(answer.values).length === 0)
        add('answer.values', 'Move at least one slider before saving')
      checkKeys('answer.values', Object.keys(answer.values))
      break
    case 'pair':
      if (answer.preferred === null) {
        if (!rules.allowNoPreference)
          add('answer.preferred', 'This session asks you to choose one of the two')
      } else checkCode('answer.preferred', answer.preferred)
      checkKeys('answer.more', Object.keys(answer.more))
      for (const [key, code] of Object.entries(answer.more)) checkCode(`answer.more.${key}`, code)
      break
    case 'triangle':
      checkCode('answer.odd', answer.odd)
      break
  }
  return problems
}
