import { DesignError } from './errors.ts'
import { createRandom, deriveSeed, shuffle, type Seed } from './random.ts'
import { placeRepeats } from './repeats.ts'

export interface PairTrial<T> {
  /** Which matched clip set (excerpt) the two clips come from. */
  set: number
  /** Heard or shown first. */
  a: T
  b: T
  /** Index of the trial this one repeats with A and B swapped; null for a first showing. */
  repeatOf: number | null
}

export interface PairOptions {
  playerIndex: number
  seed: Seed
  /** Matched clip sets; each set holds every recipe once. Defaults to one. */
  sets?: number
  /** Hidden duplicates per player. */
  duplicates?: number
}

/**
 * Whether item i goes first against item j in the base orientation, a tournament in which
 * every item leads as often as it follows (odd m) or within one (even m). The first sample
 * of a pair is preferred more often than chance, so no recipe may lead more than another.
 */
export function leadsInBase(i: number, j: number, m: number): boolean {
  if (i === j) throw new DesignError('A pair needs two different items')
  if (m % 2 === 0) {
    const last = m - 1
    // The last item splits its matches with the odd-sized rest: it leads against odd indices.
    if (i === last) return j % 2 === 1
    if (j === last) return i % 2 === 0
    return leadsInBase(i, j, m - 1)
  }
  const step = (((j - i) % m) + m) % m
  return step <= (m - 1) / 2
}

/**
 * One player's pair trials: every unordered pair of recipes in every clip set. The base
 * orientation is reversed on alternate (player + set), so each pair is shown AB to one player
 * and BA to the next, and each recipe is first as often as second, exactly over an even
 * number of sets or players and within one otherwise. Recipes are relabelled by the seed so
 * the recipe that leads once more (even counts) differs between sessions.
 */
export function pairTrials<T>(recipes: readonly T[], options: PairOptions): PairTrial<T>[] {
  const { playerIndex, seed, sets = 1, duplicates = 0 } = options
  const m = recipes.length
  if (m < 2) throw new DesignError('A pair preference session needs at least two recipes')
  if (!Number.isInteger(sets) || sets < 1) {
    throw new DesignError(`A pair preference session needs at least one clip set, got ${sets}`)
  }
  if (!Number.isInteger(playerIndex) || playerIndex < 0) {
    throw new DesignError(`A player index must be a whole number from 0, got ${playerIndex}`)
  }
  const labels = shuffle(recipes, createRandom(deriveSeed(seed, 'pairs/labels')))
  const trials: Omit<PairTrial<T>, 'repeatOf'>[] = []
  for (let set = 0; set < sets; set++) {
    const flip = (playerIndex + set) % 2 === 1
    for (let i = 0; i < m; i++) {
      for (let j = i + 1; j < m; j++) {
        const iFirst = leadsInBase(i, j, m) !== flip
        const [a, b] = iFirst ? [labels[i], labels[j]] : [labels[j], labels[i]]
        trials.push({ set, a, b })
      }
    }
  }
  const random = createRandom(deriveSeed(seed, `pairs/player/${playerIndex}`))
  const order = shuffle(trials, random)
  return placeRepeats(order, duplicates, random, (t) => ({ set: t.set, a: t.b, b: t.a })).map(
    ({ item, repeatOf }) => ({ ...item, repeatOf }),
  )
}
