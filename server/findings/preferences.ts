/*
 * Findings of pair answers: which recipe players preferred, the scale fitted to those choices,
 * and per attribute which of two recipes was judged to have more of it.
 */
import {
  ADJUSTMENT_LABEL,
  adjustP,
  formatP,
  preferenceFindings,
  signTest,
  type Adjustment,
  type Id,
} from '../analysis/index.ts'
import type { AttributeSpec } from '../../shared/schemas/sessions'
import type { MorePair, PreferenceFindings, RecipeRef } from '../../shared/schemas/findings'
import type { ResolvedAnswers } from './answersToRatings'
import { HIGHER, percent } from './wording'

export function pairPreferences(
  answers: ResolvedAnswers,
  recipes: RecipeRef[],
  attributes: AttributeSpec[],
  adjustment: Adjustment = 'holm',
): PreferenceFindings {
  const names = new Map<Id, string>(recipes.map((r) => [r.id, r.name]))
  const name = (id: Id) => names.get(id) ?? String(id)
  const ids = recipes.map((r) => r.id)
  const engine = preferenceFindings(answers.preferences, ids, name, adjustment)
  return {
    answers: answers.preferences.length,
    pairs: engine.pairs.map((p) => ({ ...p, first: Number(p.first), second: Number(p.second) })),
    scale: {
      items: engine.scale.items.map(Number),
      reference: engine.scale.reference === null ? null : Number(engine.scale.reference),
      abilities: engine.scale.abilities.map((a) => ({
        ...a,
        item: Number(a.item),
        name: name(a.item),
      })),
      winProbability: engine.scale.winProbability,
      converged: engine.scale.converged,
      reason: engine.scale.reason,
    },
    attributes: attributes.map((a) => ({
      attribute: a.key,
      name: a.name,
      pairs: morePairs(answers, a, ids, name, adjustment),
    })),
  }
}

/** Sign tests for "which has more", adjusted within the attribute like the rated pairs. */
function morePairs(
  answers: ResolvedAnswers,
  attribute: AttributeSpec,
  ids: number[],
  name: (id: Id) => string,
  adjustment: Adjustment,
): MorePair[] {
  const raw: Omit<MorePair, 'adjustedP' | 'sentence'>[] = []
  for (let i = 0; i < ids.length; i++) {
    for (let j = i + 1; j < ids.length; j++) {
      let firstMore = 0
      let secondMore = 0
      for (const m of answers.more) {
        if (m.attribute !== attribute.key) continue
        const samePair =
          (m.first === ids[i] && m.second === ids[j]) || (m.first === ids[j] && m.second === ids[i])
        if (!samePair) continue
        if (m.more === ids[i]) firstMore++
        else secondMore++
      }
      if (firstMore + secondMore === 0) continue
      raw.push({
        first: ids[i],
        second: ids[j],
        firstMore,
        secondMore,
        test: signTest(firstMore, secondMore),
      })
    }
  }
  const adjusted = adjustP(
    raw.map((r) => r.test.p),
    adjustment,
  )
  const word = HIGHER[attribute.key] ?? `higher on ${attribute.name.toLowerCase()}`
  return raw.map((r, k) => {
    const firstLeads = r.firstMore >= r.secondMore
    const lead = firstLeads ? r.firstMore : r.secondMore
    const total = r.firstMore + r.secondMore
    const adjustedP = adjusted[k]
    const sentence =
      `${name(firstLeads ? r.first : r.second)} was judged ${word} than ` +
      `${name(firstLeads ? r.second : r.first)} in ${lead} of ${total} choices (${percent(lead / total)})` +
      (adjustedP === null ? '.' : `, ${ADJUSTMENT_LABEL[adjustment]} p ${formatP(adjustedP)}.`)
    return { ...r, adjustedP, sentence }
  })
}
