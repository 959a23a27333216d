import { DesignError } from './errors.ts'
import { shuffle, type Random } from './random.ts'

export interface Placed<T> {
  item: T
  /** Index (in the same list) of the trial this one repeats; null for a first showing. */
  repeatOf: number | null
}

/**
 * Hidden duplicates: `count` trials chosen by the seed are shown again later. A repeat is
 * never put directly after its original (unless every trial is repeated): back to back, the
 * player would recognise it and answer the same, which measures memory, not reliability.
 * Removing the repeats gives back the original sequence unchanged, so its balance survives.
 * Where consecutive first showings share a screen (`sameScreen`), a repeat goes only between
 * screens: wedged inside one, it would split the set the player compares side by side.
 */
export function placeRepeats<T>(
  trials: readonly T[],
  count: number,
  random: Random,
  makeRepeat: (original: T) => T,
  sameScreen?: (a: T, b: T) => boolean,
): Placed<T>[] {
  if (!Number.isInteger(count) || count < 0) {
    throw new DesignError(`Duplicates must be a whole number from 0, got ${count}`)
  }
  if (count > trials.length) {
    throw new DesignError(
      `Cannot repeat ${count} trials: a player has only ${trials.length} to choose from`,
    )
  }
  interface Entry {
    id: number
    item: T
    origin: number | null
  }
  const list: Entry[] = trials.map((item, id) => ({ id, item, origin: null }))
  // The last trial has no room after it for a gap, so it is repeated only if every trial is.
  const pool = trials.map((_, i) => i).slice(0, count < trials.length ? -1 : undefined)
  const chosen = shuffle(pool, random).slice(0, count)
  for (const [k, id] of chosen.entries()) {
    const at = list.findIndex((e) => e.id === id)
    const earliest = Math.min(at + 2, list.length)
    const slot = sameScreen
      ? pick(betweenScreens(list, earliest, sameScreen), random)
      : earliest + random.int(list.length - earliest + 1)
    list.splice(slot, 0, { id: trials.length + k, item: makeRepeat(trials[id]), origin: id })
  }
  const indexOf = new Map(list.map((e, i) => [e.id, i]))
  return list.map((e) => ({
    item: e.item,
    repeatOf: e.origin === null ? null : (indexOf.get(e.origin) ?? null),
  }))
}

/**
 * Insertion points from `earliest` to the end that fall between two screens. Repeats stand
 * alone, so only two first showings that share a screen hold a point closed; the end is always
 * open.
 */
function betweenScreens<T>(
  list: readonly { item: T; origin: number | null }[],
  earliest: number,
  sameScreen: (a: T, b: T) => boolean,
): number[] {
  const open: number[] = []
  for (let slot = earliest; slot <= list.length; slot++) {
    const before = list[slot - 1]
    const after = list[slot]
    const inside =
      before !== undefined &&
      after !== undefined &&
      before.origin === null &&
      after.origin === null &&
      sameScreen(before.item, after.item)
    if (!inside) open.push(slot)
  }
  return open
}

const pick = (slots: number[], random: Random) => slots[random.int(slots.length)]
