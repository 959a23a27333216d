/* Findings of line-scale ratings: per attribute, the recipes' means, the pairs and the omnibus. */
import {
  computeFindings,
  type Adjustment,
  type AttributeFindings as EngineAttribute,
  type Id,
  type Rating,
} from '../analysis/index.ts'
import type { AttributeSpec } from '../../shared/schemas/sessions'
import type { AttributeFindings, RecipeRef } from '../../shared/schemas/findings'
import { HIGHER } from './wording'

export function attributeInfo(attributes: AttributeSpec[]) {
  return attributes.map((a) => ({ id: a.key, name: a.name, higher: HIGHER[a.key] }))
}

export function lineScaleFindings(
  ratings: Rating[],
  recipes: RecipeRef[],
  attributes: AttributeSpec[],
  excluded: Id[],
  adjustment: Adjustment = 'holm',
  interim: { targetDifference: number | null } | null = null,
): AttributeFindings[] {
  const findings = computeFindings({
    ratings,
    recipes,
    attributes: attributeInfo(attributes),
    excludedPlayers: excluded,
    adjustment,
    interim,
  })
  const spec = new Map(attributes.map((a) => [a.key, a]))
  return findings.attributes.map((a) => toShared(a, spec.get(String(a.attribute))))
}

// The engine takes ids of either kind; ours are recipe numbers and attribute keys.
function toShared(a: EngineAttribute, spec: AttributeSpec | undefined): AttributeFindings {
  return {
    attribute: String(a.attribute),
    name: a.name,
    low: spec?.low ?? '',
    high: spec?.high ?? '',
    players: a.players,
    headline: a.headline,
    recipes: a.recipes.map((r) => ({ ...r, recipe: Number(r.recipe) })),
    pairs: a.pairs.map((p) => ({ ...p, first: Number(p.first), second: Number(p.second) })),
    omnibus: { ...a.omnibus, recipes: a.omnibus.recipes.map(Number) },
    interim: a.interim,
    mixed: {
      ...a.mixed,
      means: a.mixed.means.map((m) => ({ ...m, recipe: Number(m.recipe) })),
      contrasts: a.mixed.contrasts.map((c) => ({
        ...c,
        first: Number(c.first),
        second: Number(c.second),
      })),
    },
  }
}
