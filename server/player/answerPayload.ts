import type { BlindClip, PlannedTrial } from '../design/index.ts'
import { trialAnswer, type TrialAnswer } from '../../shared/schemas/rating'
import type { GivenAnswer } from './answerCheck'

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
  resolved: {
    /** Pair: the recipe preferred, null for "no preference". */
    preferredRecipeId?: number | null
    /** Pair: attribute key → recipe heard as having more of it. */
    moreRecipeIds?: Record<string, number>
    /** Triangle: whether the odd sample was found. */
    correct?: boolean
  }
}

const served = (c: BlindClip): ServedClip => ({
  code: c.code,
  clipId: Number(c.clipId),
  recipeId: Number(c.recipeId),
})

function servedOf(t: PlannedTrial): StoredAnswer['served'] {
  const base = { kind: t.kind, repeatOf: t.repeatOf, odd: null, setCode: null, recipeId: null }
  switch (t.kind) {
    case 'rating':
      return { ...base, excerptKey: t.excerptKey, clips: [served(t.clip)] }
    case 'pair':
      return { ...base, excerptKey: t.excerptKey, clips: [served(t.a), served(t.b)] }
    case 'triangle':
      return { ...base, excerptKey: t.excerptKey, clips: t.samples.map(served), odd: t.odd }
    case 'playtest':
      return { ...base, excerptKey: null, clips: [], setCode: t.code, recipeId: Number(t.recipeId) }
  }
}

/** Record keys in a fixed order, so "the same answer again" compares equal as text. */
export function canonicalAnswer(a: GivenAnswer): GivenAnswer {
  const sorted = <V>(r: Record<string, V>) =>
    Object.fromEntries(Object.entries(r).sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0)))
  switch (a.kind) {
    case 'rating':
      return { kind: a.kind, values: sorted(a.values) }
    case 'playtest':
      return { kind: a.kind, values: sorted(a.values), comment: a.comment }
    case 'pair':
      return { kind: a.kind, preferred: a.preferred, more: sorted(a.more) }
    case 'triangle':
      return { kind: a.kind, odd: a.odd }
  }
}

/** The row's payload for an answer already checked against its trial. */
export function storedAnswer(trial: PlannedTrial, given: GivenAnswer): StoredAnswer {
  const answer = canonicalAnswer(given)
  const s = servedOf(trial)
  const recipeOf = (code: number) => s.clips.find((c) => c.code === code)?.recipeId ?? -1
  const resolved: StoredAnswer['resolved'] = {}
  if (answer.kind === 'pair') {
    resolved.preferredRecipeId = answer.preferred === null ? null : recipeOf(answer.preferred)
    resolved.moreRecipeIds = Object.fromEntries(
      Object.entries(answer.more).map(([key, code]) => [key, recipeOf(code)]),
    )
  }
  if (answer.kind === 'triangle')
    resolved.correct = s.odd !== null && s.clips[s.odd]?.code === answer.odd
  return { given: answer, served: s, resolved }
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
  const index = (v: unknown) => (typeof v === 'number' && Number.isInteger(v) ? v : -1)
  const older =
    (t.kind === 'rating' || t.kind === 'playtest') && typeof r.ratings === 'object'
      ? { kind: t.kind, values: r.ratings }
      : t.kind === 'pair' && 'preferred' in r
        ? {
            kind: t.kind,
            preferred: r.preferred === null ? null : [t.a, t.b][index(r.preferred)]?.code,
            more: {},
          }
        : t.kind === 'triangle' && 'odd' in r
          ? { kind: t.kind, odd: t.samples[index(r.odd)]?.code }
          : null
  const parsed = trialAnswer.safeParse(older)
  return parsed.success ? canonicalAnswer(parsed.data) : null
}
