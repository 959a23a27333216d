import { DesignError } from './errors.ts'
import { createRandom, deriveSeed, shuffle, type Seed } from './random.ts'
import { placeRepeats } from './repeats.ts'

/** The six serving orders of a triangle: one letter appears once and is the odd sample. */
export const TRIANGLE_ORDERS = ['ABB', 'BAB', 'BBA', 'AAB', 'ABA', 'BAA'] as const
export type TriangleOrder = (typeof TRIANGLE_ORDERS)[number]

/** Players over which both the order and which recipe plays "A" come round once each. */
export const TRIANGLE_BLOCK = 12

export interface TriangleTrial<T> {
  set: number
  order: TriangleOrder
  samples: [T, T, T]
  /** Position (0–2) of the odd sample: the answer that counts as correct. */
  odd: 0 | 1 | 2
  /** Index of the trial this one repeats; null for a first showing. */
  repeatOf: number | null
}

export interface TriangleOptions {
  playerIndex: number
  seed: Seed
  sets?: number
  duplicates?: number
}

/** The session's dealing order of the six orders, so sessions do not all start with ABB. */
export function triangleOrderSequence(seed: Seed): TriangleOrder[] {
  return shuffle(TRIANGLE_ORDERS, createRandom(deriveSeed(seed, 'triangle/orders')))
}

/**
 * The triangle player `playerIndex` gets for trial key `key` (a pair of recipes in a set).
 * The order moves on by one per player, so any six consecutive players see the six orders
 * once each; which recipe plays "A" swaps every block of six players, so within each aligned
 * block each recipe is the odd sample three times, and any twelve consecutive players meet
 * every order with each recipe as "A" once.
 */
export function triangleDeal<T>(
  pair: readonly [T, T],
  playerIndex: number,
  key: number,
  sequence: readonly TriangleOrder[],
): { order: TriangleOrder; samples: [T, T, T]; odd: 0 | 1 | 2 } {
  const order = sequence[(playerIndex + key) % 6]
  const swapped = Math.floor(playerIndex / 6) % 2 === 1
  return fromOrder(order, swapped ? [pair[1], pair[0]] : pair)
}

function fromOrder<T>(order: TriangleOrder, [a, b]: readonly [T, T]) {
  const samples = [...order].map((letter) => (letter === 'A' ? a : b)) as [T, T, T]
  const oddLetter = order.split('A').length === 2 ? 'A' : 'B'
  const odd = order.indexOf(oddLetter) as 0 | 1 | 2
  return { order, samples, odd }
}

/**
 * The order for a hidden repeat: ABB becomes AAB, so the other recipe is the odd one and the
 * player cannot answer the repeat by remembering which recipe (or position) stood out.
 */
export function repeatOrder(order: TriangleOrder): TriangleOrder {
  return TRIANGLE_ORDERS[(TRIANGLE_ORDERS.indexOf(order) + 3) % 6]
}

/**
 * One player's triangles: every unordered pair of recipes in every clip set, each dealt as
 * above under its own key so the balance holds for every pair and set across the panel.
 */
export function triangleTrials<T>(
  recipes: readonly T[],
  options: TriangleOptions,
): TriangleTrial<T>[] {
  const { playerIndex, seed, sets = 1, duplicates = 0 } = options
  if (recipes.length < 2) throw new DesignError('A triangle session needs at least two recipes')
  if (!Number.isInteger(sets) || sets < 1) {
    throw new DesignError(`A triangle session needs at least one clip set, got ${sets}`)
  }
  if (!Number.isInteger(playerIndex) || playerIndex < 0) {
    throw new DesignError(`A player index must be a whole number from 0, got ${playerIndex}`)
  }
  const sequence = triangleOrderSequence(seed)
  const trials: Omit<TriangleTrial<T>, 'repeatOf'>[] = []
  let key = 0
  for (let set = 0; set < sets; set++) {
    for (let i = 0; i < recipes.length; i++) {
      for (let j = i + 1; j < recipes.length; j++) {
        const pair = [recipes[i], recipes[j]] as const
        trials.push({ set, ...triangleDeal(pair, playerIndex, key, sequence) })
        key++
      }
    }
  }
  const random = createRandom(deriveSeed(seed, `triangle/player/${playerIndex}`))
  const order = shuffle(trials, random)
  // Same letters, mirrored order: the recipe that was served twice is now the odd one.
  const repeat = (t: (typeof trials)[number]) => {
    const letters = [t.samples[t.order.indexOf('A')], t.samples[t.order.indexOf('B')]] as const
    return { set: t.set, ...fromOrder(repeatOrder(t.order), letters) }
  }
  return placeRepeats(order, duplicates, random, repeat).map(({ item, repeatOf }) => ({
    ...item,
    repeatOf,
  }))
}
