import {
  createRandom,
  deriveSeed,
  placeRepeats,
  williamsOrder,
  williamsRowCount,
} from '../design/index.ts'
import { STRING_FITTING_CAUTION } from '../../shared/cautions'
import { checkSliders, collectSliders, sortedRecord } from './shared'
import { playtestAnswer } from '../../shared/schemas/rating'
import type { FormatModule } from './types'

/**
 * Play-test: players fit coded physical sets on their own instruments over days and rate each
 * set on line scales. Codes stand for sets of a recipe; nothing is played from the server.
 */
export const playtestFormat: FormatModule<'playtest'> = {
  kind: 'playtest',
  answer: playtestAnswer,
  minRecipes: 1,
  clipSets: 'none',
  ratesAttributes: true,
  findings: ['attributes', 'aging'],
  noPreferenceOption: false,
  codes: { of: 'set', showings: 1 },
  cautions: [STRING_FITTING_CAUTION],
  balancedBlock: (recipes) => williamsRowCount(recipes),

  plan(input, p, codes) {
    const { recipes, duplicates, seed } = input
    const order = williamsOrder(recipes, p, deriveSeed(seed, 'playtest'))
    const random = createRandom(deriveSeed(seed, `playtest/player/${p}`))
    return placeRepeats(order, duplicates, random, (id) => id).map(({ item, repeatOf }) => ({
      kind: 'playtest',
      recipeId: item,
      code: codes.set(item, repeatOf === null ? 0 : 1),
      repeatOf,
    }))
  },

  servings: () => [],
  setCode: (t) => t.code,
  screenGroup: () => null,
  check: (_t, answer, rules, add) => checkSliders(add, answer.values, rules.attributeKeys),
  canonical: (a) => ({ kind: a.kind, values: sortedRecord(a.values), comment: a.comment }),
  resolve: () => ({}),

  // A set has no clip; its recipe and showing stand in, so reliability still pairs a set
  // with its hidden repeat.
  collect: (out, trial, answer, context, attributes) =>
    collectSliders(out, answer.values, context, attributes, {
      recipe: trial.recipeId,
      clip: `set:${trial.recipeId}`,
      code: trial.code,
      excerpt: '',
      comment: answer.comment ?? '',
    }),

  olderAnswer: (r) =>
    typeof r.ratings === 'object' ? { kind: 'playtest', values: r.ratings } : null,
}
