import {
  createRandom,
  deriveSeed,
  placeRepeats,
  williamsOrder,
  williamsRowCount,
} from '../design/index.ts'
import { LISTENING_CAUTION } from '../../shared/cautions'
import { blindClip, checkSliders, collectSliders, secondTake, sortedRecord } from './shared'
import { ratingAnswer } from '../../shared/schemas/rating'
import type { FormatModule } from './types'

/**
 * Attribute rating (sensory profiling on line scales, ISO 13299): each clip alone, rated on
 * every attribute. First showings of one matched set share a screen, so players can switch.
 */
export const ratingFormat: FormatModule<'rating'> = {
  kind: 'rating',
  answer: ratingAnswer,
  minRecipes: 1,
  clipSets: 'any',
  ratesAttributes: true,
  findings: ['attributes', 'objective', 'aging'],
  noPreferenceOption: false,
  codes: { of: 'clip', showings: 1 },
  cautions: [LISTENING_CAUTION],
  balancedBlock: (recipes) => williamsRowCount(recipes),

  /**
   * Excerpts in Williams order over the sets, and within each set the clips in Williams order.
   * Set s uses row p + s, so a player hears different recipe orders for different excerpts
   * while, for each set, consecutive players still walk through the rows of one square.
   */
  plan(input, p, codes) {
    const { clipSets, duplicates, seed } = input
    const sets = clipSets.map((_, s) => s)
    const main = williamsOrder(sets, p, deriveSeed(seed, 'rating/sets')).flatMap((set) =>
      williamsOrder(clipSets[set].clips, p + set, deriveSeed(seed, `rating/set/${set}`)).map(
        (clip) => ({ set, clip }),
      ),
    )
    const random = createRandom(deriveSeed(seed, `rating/player/${p}`))
    // A repeat waits for its set's screen to end: wedged inside, it would split the set.
    const sameScreen = (a: (typeof main)[number], b: (typeof main)[number]) => a.set === b.set
    return placeRepeats(main, duplicates, random, (t) => t, sameScreen).map(
      ({ item, repeatOf }) => ({
        kind: 'rating',
        excerptKey: clipSets[item.set].excerptKey,
        clip:
          repeatOf === null
            ? blindClip(codes, item.clip, 0)
            : blindClip(codes, secondTake(clipSets[item.set], item.clip), 1),
        repeatOf,
      }),
    )
  },

  servings: (t) => [t.clip],
  setCode: () => null,
  screenGroup: (t) => (t.repeatOf === null ? t.excerptKey : null),
  check: (_t, answer, rules, add) => checkSliders(add, answer.values, rules.attributeKeys),
  canonical: (a) => ({ kind: a.kind, values: sortedRecord(a.values) }),
  resolve: () => ({}),

  collect: (out, { clip, excerptKey }, answer, context, attributes) =>
    collectSliders(out, answer.values, context, attributes, {
      recipe: clip.recipeId,
      clip: clip.clipId,
      code: clip.code,
      excerpt: excerptKey,
      comment: '',
    }),

  olderAnswer: (r) =>
    typeof r.ratings === 'object' ? { kind: 'rating', values: r.ratings } : null,
}
