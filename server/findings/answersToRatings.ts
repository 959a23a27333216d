import type { Id, PreferenceAnswer, Rating } from '../analysis/index.ts'
import type { PlannedTrial } from '../design/index.ts'
import { trialAnswer, type TrialAnswer } from '../../shared/schemas/rating'

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
export function readAnswer(payload: unknown): TrialAnswer | null {
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
  const known = new Set(attributes)
  for (const stored of answers) {
    const trial = trials[stored.trialIndex]
    const answer = readAnswer(stored.payload)
    if (!trial || !answer || answer.kind !== trial.kind) {
      out.unreadable++
      continue
    }
    const base = {
      player,
      trial: stored.trialIndex,
      repeatOf: trial.repeatOf,
      kind: trial.kind,
      answeredAt: stored.answeredAt,
      comment: '',
    }
    if ((trial.kind === 'rating' || trial.kind === 'playtest') && 'values' in answer) {
      // A play-test set has no clip; its code's recipe and showing stand in, so reliability
      // still pairs a set with its hidden repeat.
      const recipe = trial.kind === 'rating' ? trial.clip.recipeId : trial.recipeId
      const clip = trial.kind === 'rating' ? trial.clip.clipId : `set:${trial.recipeId}`
      const code = trial.kind === 'rating' ? trial.clip.code : trial.code
      const excerpt = trial.kind === 'rating' ? trial.excerptKey : ''
      const comment = answer.kind === 'playtest' ? (answer.comment ?? '') : ''
      for (const attribute of attributes) {
        const value = answer.values[attribute]
        if (value === undefined) continue
        out.ratings.push({ player, recipe, attribute, value, clip })
        out.rows.push({
          ...base,
          excerpt,
          attribute,
          codes: [code],
          recipes: [recipe],
          answerCode: null,
          answerRecipe: null,
          value,
          comment,
        })
      }
    } else if (trial.kind === 'pair' && answer.kind === 'pair') {
      const sides = [trial.a, trial.b]
      const recipeOf = (code: number) => sides.find((s) => s.code === code)?.recipeId
      const common = {
        ...base,
        excerpt: trial.excerptKey,
        codes: sides.map((s) => s.code),
        recipes: sides.map((s) => s.recipeId),
        value: null,
      }
      const preferred = answer.preferred === null ? null : recipeOf(answer.preferred)
      if (preferred !== undefined) {
        out.preferences.push({
          player,
          first: trial.a.recipeId,
          second: trial.b.recipeId,
          preferred,
        })
        out.rows.push({
          ...common,
          attribute: 'preference',
          answerCode: answer.preferred,
          answerRecipe: preferred,
        })
      }
      for (const [attribute, code] of Object.entries(answer.more)) {
        const more = recipeOf(code)
        if (!known.has(attribute) || more === undefined) continue
        out.more.push({
          player,
          attribute,
          first: trial.a.recipeId,
          second: trial.b.recipeId,
          more,
        })
        out.rows.push({ ...common, attribute, answerCode: code, answerRecipe: more })
      }
    } else if (trial.kind === 'triangle' && answer.kind === 'triangle') {
      const chosen = trial.samples.find((s) => s.code === answer.odd)
      if (!chosen) {
        out.unreadable++
        continue
      }
      const correct = answer.odd === trial.samples[trial.odd].code
      out.triangles.push({ player, correct, repeat: trial.repeatOf !== null })
      out.rows.push({
        ...base,
        excerpt: trial.excerptKey,
        attribute: 'odd one out',
        codes: trial.samples.map((s) => s.code),
        recipes: trial.samples.map((s) => s.recipeId),
        answerCode: answer.odd,
        answerRecipe: chosen.recipeId,
        value: correct ? 1 : 0,
      })
    }
  }
  return out
}
