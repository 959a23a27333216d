import { TRIANGLE_BLOCK, triangleTrials, type BlindClip, type Id } from '../design/index.ts'
import { LISTENING_CAUTION } from '../../shared/cautions'
import { blindClip, checkCode, clipOfRecipe, secondTake } from './shared'
import { triangleAnswer } from '../../shared/schemas/rating'
import type { FormatModule } from './types'

/**
 * Odd-one-out (the triangle test, ISO 4120): three clips, two of one recipe; which is the odd
 * one? The six orders are dealt in balanced blocks.
 */
export const triangleFormat: FormatModule<'triangle'> = {
  kind: 'triangle',
  answer: triangleAnswer,
  minRecipes: 2,
  clipSets: 'one-of-each',
  ratesAttributes: false,
  findings: ['triangle'],
  noPreferenceOption: false,
  // One clip is served twice in a trial, and identical codes would point at the odd one.
  codes: { of: 'clip', showings: 2 },
  cautions: [LISTENING_CAUTION],
  balancedBlock: () => TRIANGLE_BLOCK,

  plan(input, p, codes) {
    const { recipes, clipSets, duplicates, seed } = input
    const options = { playerIndex: p, seed, sets: clipSets.length, duplicates }
    return triangleTrials(recipes, options).map((t) => {
      // The doubled recipe's second serving is its second take where the set has one (its own
      // recording); otherwise the same clip under the next showing's code: 0 and 1, or 2 and 3.
      const served = new Set<Id>()
      const base = t.repeatOf === null ? 0 : 2
      const set = clipSets[t.set]
      const samples = t.samples.map((recipeId) => {
        const clip = clipOfRecipe(set.clips, recipeId)
        if (!served.has(recipeId)) {
          served.add(recipeId)
          return blindClip(codes, clip, base)
        }
        const twin = secondTake(set, clip)
        return blindClip(codes, twin, twin === clip ? base + 1 : base)
      }) as [BlindClip, BlindClip, BlindClip]
      const excerptKey = clipSets[t.set].excerptKey
      const { order, odd, repeatOf } = t
      return { kind: 'triangle', excerptKey, order, samples, odd, repeatOf }
    })
  },

  servings: (t) => t.samples,
  setCode: () => null,
  screenGroup: () => null,
  check: (trial, answer, _rules, add) => checkCode(add, 'answer.odd', answer.odd, trial.samples),
  canonical: (a) => ({ kind: a.kind, odd: a.odd }),
  resolve: (trial, answer) => ({ correct: trial.samples[trial.odd]?.code === answer.odd }),

  collect(out, trial, answer, context) {
    const chosen = trial.samples.find((s) => s.code === answer.odd)
    if (!chosen) return false
    const correct = answer.odd === trial.samples[trial.odd].code
    out.triangles.push({ player: context.player, correct, repeat: trial.repeatOf !== null })
    out.rows?.push({
      ...context,
      excerpt: trial.excerptKey,
      attribute: 'odd one out',
      codes: trial.samples.map((s) => s.code),
      recipes: trial.samples.map((s) => s.recipeId),
      answerCode: answer.odd,
      answerRecipe: chosen.recipeId,
      value: correct ? 1 : 0,
    })
    return true
  },

  olderAnswer(r, t) {
    if (!('odd' in r)) return null
    return { kind: 'triangle', odd: t.samples[typeof r.odd === 'number' ? r.odd : -1]?.code }
  },
}
