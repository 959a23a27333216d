import {
  createRandom,
  deriveSeed,
  placeRepeats,
  williamsOrder,
  williamsRowCount,
} from '../design/index.ts'
import { LISTENING_CAUTION } from '../../shared/cautions'
import { blindClip, checkSliders, sortedRecord } from './shared'
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
  alikeServings: false,
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
    return placeRepeats(main, duplicates, random, (t) => t).map(({ item, repeatOf }) => ({
      kind: 'rating',
      excerptKey: clipSets[item.set].excerptKey,
      clip: blindClip(codes, item.clip, repeatOf === null ? 0 : 1),
      repeatOf,
    }))
  },

  servings: (t) => [t.clip],
  setCode: () => null,
  screenGroup: (t) => (t.repeatOf === null ? t.excerptKey : null),
  check: (_t, answer, rules, add) => checkSliders(add, answer.values, rules.attributeKeys),
  canonical: (a) => ({ kind: a.kind, values: sortedRecord(a.values) }),
  resolve: () => ({}),

  collect(out, trial, answer, context, attributes) {
    const { clip, excerptKey } = trial
    for (const attribute of attributes) {
      const value = answer.values[attribute]
      if (value === undefined) continue
      out.ratings.push({
        player: context.player,
        recipe: clip.recipeId,
        attribute,
        value,
        clip: clip.clipId,
      })
      out.rows.push({
        ...context,
        excerpt: excerptKey,
        attribute,
        codes: [clip.code],
        recipes: [clip.recipeId],
        answerCode: null,
        answerRecipe: null,
        value,
      })
    }
    return true
  },

  olderAnswer: (r) =>
    typeof r.ratings === 'object' ? { kind: 'rating', values: r.ratings } : null,
}
