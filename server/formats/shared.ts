import type { BlindClip, DesignClip, DesignClipSet, Id, SessionCodes } from '../design/index.ts'
import type { ResolvedAnswers } from '../findings/answersToRatings'
import type { AddProblem, AnswerContext } from './types'

// Small pieces more than one format needs.

/** A record with its keys in a fixed order, so equal answers are equal as text. */
export const sortedRecord = <V>(r: Record<string, V>): Record<string, V> =>
  Object.fromEntries(Object.entries(r).sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0)))

/** Attribute keys must be the session's own. */
export function checkAttributeKeys(
  add: AddProblem,
  field: string,
  keys: string[],
  known: readonly string[],
): void {
  for (const key of keys)
    if (!known.includes(key)) add(`${field}.${key}`, 'Not rated in this session')
}

/**
 * Codes must be this trial's, so an answer meant for another trial (or another player) is
 * refused rather than counted against the wrong recording.
 */
export function checkCode(add: AddProblem, field: string, code: number, served: BlindClip[]) {
  if (!served.some((c) => c.code === code))
    add(field, `Code ${code} is not one of this trial's recordings`)
}

/** The recipe behind a code among the clips a trial served; -1 when none of them has it. */
export const recipeOfCode = (served: BlindClip[], code: number): number =>
  Number(served.find((c) => c.code === code)?.recipeId ?? -1)

/** A clip with its code for one showing. */
export const blindClip = (codes: SessionCodes, clip: DesignClip, copy: number): BlindClip => ({
  ...clip,
  code: codes.clip(clip.clipId, copy),
})

/** The clip of a recipe in a matched set (validated designs have exactly one). */
export const clipOfRecipe = (clips: DesignClip[], recipeId: Id) =>
  clips.find((clip) => clip.recipeId === recipeId) as DesignClip

/**
 * The clip behind a recipe's second appearance (a triangle's twin, a hidden repeat): the set's
 * second take of that recipe when it has one, so the two servings are different recordings and
 * no comparison of the files pairs them; otherwise the same clip again.
 */
export const secondTake = (set: DesignClipSet, clip: DesignClip): DesignClip =>
  set.twins?.find((t) => t.recipeId === clip.recipeId) ?? clip

/** Line-scale sliders: at least one moved, every key the session's. */
export function checkSliders(
  add: AddProblem,
  values: Record<string, number>,
  known: readonly string[],
): void {
  if (Object.keys(values).length === 0)
    add('answer.values', 'Move at least one slider before saving')
  checkAttributeKeys(add, 'answer.values', Object.keys(values), known)
}

/**
 * Line-scale values of one answer into the findings' ratings and export rows, in the order of
 * the session's attributes; `rated` says what was rated (a clip, or a play-test set).
 */
export function collectSliders(
  out: ResolvedAnswers,
  values: Record<string, number>,
  context: AnswerContext,
  attributes: readonly string[],
  rated: { recipe: Id; clip: Id; code: number; excerpt: string; comment: string },
): true {
  for (const attribute of attributes) {
    const value = values[attribute]
    if (value === undefined) continue
    const { recipe, clip, code, excerpt, comment } = rated
    const item = context.item || undefined
    out.ratings.push({ player: context.player, recipe, attribute, value, clip, item })
    out.rows?.push({
      ...context,
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
  return true
}
