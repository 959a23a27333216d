import type { BlindClip, PlannedTrial } from '../design/index.ts'
import { trialAnswer } from '../../shared/schemas/rating'
import { AppError } from '../errors'
import { formatOf, type GivenAnswer, type ResolvedFacts } from '../formats/index.ts'
import { canonicalAnswer } from '../formats/answers'

// The one reader and writer of stored answers. An answers row holds the blind answer as the
// player gave it (`given`) and beside it the server-side truth (clips, recipes, the odd sample)
// of what was served; only `given` ever goes back to a player. The player's own pages, saving,
// findings and exports all read answers here, and an answer in a shape this module does not
// know is an error naming the answer, never a silent skip.

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

/** A stored answer that cannot be read: the record is damaged, not the request. */
export class UnreadableAnswer extends AppError {
  constructor(
    readonly answerId: number,
    why: string,
  ) {
    super('conflict', `Answer ${answerId} cannot be read: ${why}`)
  }
}

export function sameAnswer(payload: string, answer: GivenAnswer): boolean {
  const stored = knownShape(payload, null)
  return (
    stored !== null &&
    JSON.stringify(canonicalAnswer(stored)) === JSON.stringify(canonicalAnswer(answer))
  )
}

/**
 * The blind answer of a stored row, for the trial it was saved for. Three shapes are known: the
 * current `{ given, served, resolved }`, a bare answer, and the positional shape of rows
 * written before answers were kept in codes (read with the trial at hand).
 */
export function readAnswer(
  row: { id: number; payload: string },
  trial: PlannedTrial | undefined,
): GivenAnswer {
  if (!trial) throw new UnreadableAnswer(row.id, 'its trial is not in the served record')
  const answer = knownShape(row.payload, trial)
  if (!answer) throw new UnreadableAnswer(row.id, 'it is stored in an unknown shape')
  if (answer.kind !== trial.kind)
    throw new UnreadableAnswer(row.id, `it is a ${answer.kind} answer to a ${trial.kind} trial`)
  return answer
}

/** The answer as stored, checked but not re-ordered: readers look values up by key, and on a
 * large panel putting every answer's keys in order cost more than the statistics. */
function knownShape(payload: string, trial: PlannedTrial | null): GivenAnswer | null {
  let data: unknown
  try {
    data = JSON.parse(payload)
  } catch {
    return null
  }
  if (typeof data !== 'object' || data === null) return null
  const record = data as Record<string, unknown>
  const current = trialAnswer.safeParse('given' in record ? record.given : record)
  if (current.success) return current.data
  return trial ? olderAnswer(record, trial) : null
}

function olderAnswer(r: Record<string, unknown>, t: PlannedTrial): GivenAnswer | null {
  const parsed = trialAnswer.safeParse(formatOf(t.kind).olderAnswer?.(r, t) ?? null)
  return parsed.success ? canonicalAnswer(parsed.data) : null
}
