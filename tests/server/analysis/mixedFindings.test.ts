import { describe, expect, it } from 'vitest'
import { attributeMixedModel } from '../../../server/analysis/mixedFindings.ts'
import fixture from './fixtures/mixedModel.json'

// The findings' view of the mixed model, against the same lme4/lmerTest/emmeans fixture as the
// model itself (fixtures/mixedModel.R): pairs turned to second − first, a fit with a variance
// at 0 marked singular (lme4 reports "boundary (singular) fit" there).

type Row = [string, string, number]
const cases = fixture.cases as unknown as {
  name: string
  recipes: string[]
  ratings: Row[]
  pairsTukey: { contrast: string; estimate: number; t: number; p: number }[]
}[]
const ratingsOf = (c: (typeof cases)[number]) =>
  c.ratings.map(([player, recipe, value]) => ({ player, recipe, value }))
const boundary = cases.find((c) => c.name === 'player variance on the boundary')!

describe('the mixed model on the findings page', () => {
  it('turns emmeans pairs (first − second) into the pair table’s second − first', () => {
    const summary = attributeMixedModel(ratingsOf(boundary), boundary.recipes)
    const r = boundary.pairsTukey[0]
    expect(r.contrast).toBe('r1 - r2')
    const ours = summary.contrasts[0]
    expect([ours.first, ours.second]).toEqual(['r1', 'r2'])
    expect(Math.abs((ours.estimate as number) + r.estimate)).toBeLessThan(1e-6)
    expect(Math.abs((ours.t as number) + r.t)).toBeLessThan(1e-6)
    expect(Math.abs((ours.p as number) - r.p)).toBeLessThan(1e-9)
  })

  it('marks a fit with a variance at 0 as singular, and a sound one not', () => {
    expect(attributeMixedModel(ratingsOf(boundary), boundary.recipes).singular).toBe(true)
    const balanced = cases[0]
    const fit = attributeMixedModel(ratingsOf(balanced), balanced.recipes)
    expect(fit.singular).toBe(false)
    expect(fit.formula).toBe('rating ~ recipe + (1 | player) + (1 | player:recipe)')
  })

  it('leaves out ratings of recipes the session does not list', () => {
    const balanced = cases[0]
    const stray = [...ratingsOf(balanced), { player: 'x', recipe: 'elsewhere', value: 10 }]
    expect(attributeMixedModel(stray, balanced.recipes).n).toBe(balanced.ratings.length)
  })
})
