import type { BlindClip, PlannedTrial } from '../design/index.ts'
import { trialAnswer, type TrialAnswer } from '../../shared/schemas/rating'
import { formatOf, type GivenAnswer, type ResolvedFacts } from '../formats/index.ts'
import { canonicalAnswer } from '../formats/answers'

// What an answers row holds: the blind answer as the player gave it (`given`), and beside it
// the server-side truth (clips, recipes, the odd sample) that findings need. Only `given` ever
// goes back to a player.

interface ServedClip {
  code: number
  clipId: number
  recipeId: number
}

export interface StoredAnswer {
  given: GivenAnswer
  served: {
    kind: PlannedTrial['kind']
    repeatOf: number | null
    excerptKey: string | null
    clips: ServedClip[]
    /** Triangle: which sample was the odd one. */
    odd: number | null
    /** Play-test: the coded set and the recipe in it. */
    setCode: number | null
    recipeId: number | null
  }
  resolved: ResolvedFacts
}

const served = (c: BlindClip): ServedClip => ({
  code: c.code,
  clipId: Number(c.clipId),
  recipeId: Number(c.recipeId),
})

function servedOf(t: PlannedTrial): StoredAnswer['served'] {
  const format = formatOf(t.kind)
  return {
    kind: t.kind,
    repeatOf: t.repeatOf,
    excerptKey: 'excerptKey' in t ? t.excerptKey : null,
    clips: format.servings(t).map(served),
    odd: 'odd' in t ? t.odd : null,
    setCode: format.setCode(t),
    recipeId: 'recipeId' in t ? Number(t.recipeId) : null,
  }
}

/** The row's payload for an answer already checked against its trial. */
export function storedAnswer(trial: PlannedTrial, given: GivenAnswer): StoredAnswer {
  const answer = canonicalAnswer(given)
  return {
    given: answer,
    served: servedOf(trial),
    resolved: answer.kind === trial.kind ? formatOf(trial.kind).resolve(trial, answer) : {},
  }
}

export function sameAnswer(payload: string, answer: GivenAnswer): boolean {
  const stored = givenAnswer(payload, null)
  return stored !== null && JSON.stringify(stored) === JSON.stringify(canonicalAnswer(answer))
}

/**
 * The blind answer in a stored payload. Rows written before the player pages existed (the
 * demo) hold an older shape by position; with the trial at hand they are read back in codes.
 */
export function givenAnswer(payload: string, trial: PlannedTrial | null): TrialAnswer | null {
  let data: unknown
  try {
    data = JSON.parse(payload)
  } catch {
    return null
  }
  if (typeof data !== 'object' || data === null) return null
  const record = data as Record<string, unknown>
  const current = trialAnswer.safeParse(record.given)
  if (current.success) return canonicalAnswer(current.data)
  return trial ? olderAnswer(record, trial) : null
}

function olderAnswer(r: Record<string, unknown>, t: PlannedTrial): TrialAnswer | null {
  const parsed = trialAnswer.safeParse(formatOf(t.kind).olderAnswer?.(r, t) ?? null)
  return parsed.success ? canonicalAnswer(parsed.data) : null
}
