import { pairTrials } from '../design/index.ts'
import { LISTENING_CAUTION } from '../../shared/cautions'
import {
  blindClip,
  checkAttributeKeys,
  checkCode,
  clipOfRecipe,
  recipeOfCode,
  secondTake,
  sortedRecord,
} from './shared'
import { pairAnswer } from '../../shared/schemas/rating'
import type { FormatModule } from './types'

/**
 * Pair preference (paired comparison, ISO 5495): two clips of one matched set; which do you
 * prefer, and which has more of each attribute. Every pair is heard both ways round.
 */
export const pairFormat: FormatModule<'pair'> = {
  kind: 'pair',
  answer: pairAnswer,
  minRecipes: 2,
  clipSets: 'one-of-each',
  ratesAttributes: true,
  findings: ['preferences'],
  noPreferenceOption: true,
  codes: { of: 'clip', showings: 1 },
  cautions: [LISTENING_CAUTION],
  balancedBlock: () => 2,

  plan(input, p, codes) {
    const { recipes, clipSets, duplicates, seed } = input
    const options = { playerIndex: p, seed, sets: clipSets.length, duplicates }
    return pairTrials(recipes, options).map((t) => {
      const set = clipSets[t.set]
      // A repeat plays each recipe's second take where the set has one.
      const serve = (recipeId: typeof t.a) => {
        const clip = clipOfRecipe(set.clips, recipeId)
        return t.repeatOf === null
          ? blindClip(codes, clip, 0)
          : blindClip(codes, secondTake(set, clip), 1)
      }
      return {
        kind: 'pair',
        excerptKey: set.excerptKey,
        a: serve(t.a),
        b: serve(t.b),
        repeatOf: t.repeatOf,
      }
    })
  },

  servings: (t) => [t.a, t.b],
  setCode: () => null,
  screenGroup: () => null,

  check(trial, answer, rules, add) {
    const served = [trial.a, trial.b]
    if (answer.preferred === null) {
      if (!rules.allowNoPreference)
        add('answer.preferred', 'This session asks you to choose one of the two')
    } else checkCode(add, 'answer.preferred', answer.preferred, served)
    checkAttributeKeys(add, 'answer.more', Object.keys(answer.more), rules.attributeKeys)
    for (const [key, code] of Object.entries(answer.more))
      checkCode(add, `answer.more.${key}`, code, served)
  },

  canonical: (a) => ({ kind: a.kind, preferred: a.preferred, more: sortedRecord(a.more) }),

  resolve(trial, answer) {
    const served = [trial.a, trial.b]
    return {
      preferredRecipeId: answer.preferred === null ? null : recipeOfCode(served, answer.preferred),
      moreRecipeIds: Object.fromEntries(
        Object.entries(answer.more).map(([key, code]) => [key, recipeOfCode(served, code)]),
      ),
    }
  },

  collect(out, trial, answer, context, attributes) {
    const sides = [trial.a, trial.b]
    const recipeOf = (code: number) => sides.find((s) => s.code === code)?.recipeId
    const common = {
      ...context,
      excerpt: trial.excerptKey,
      codes: sides.map((s) => s.code),
      recipes: sides.map((s) => s.recipeId),
      value: null,
    }
    const { player } = context
    const [first, second] = [trial.a.recipeId, trial.b.recipeId]
    const preferred = answer.preferred === null ? null : recipeOf(answer.preferred)
    if (preferred !== undefined) {
      out.preferences.push({ player, first, second, preferred })
      out.rows?.push({
        ...common,
        attribute: 'preference',
        answerCode: answer.preferred,
        answerRecipe: preferred,
      })
    }
    for (const [attribute, code] of Object.entries(answer.more)) {
      const more = recipeOf(code)
      if (!attributes.includes(attribute) || more === undefined) continue
      out.more.push({ player, attribute, first, second, more })
      out.rows?.push({ ...common, attribute, answerCode: code, answerRecipe: more })
    }
    return true
  },

  olderAnswer(r, t) {
    if (!('preferred' in r)) return null
    const index = typeof r.preferred === 'number' ? r.preferred : -1
    return {
      kind: 'pair',
      preferred: r.preferred === null ? null : [t.a, t.b][index]?.code,
      more: {},
    }
  },
}
