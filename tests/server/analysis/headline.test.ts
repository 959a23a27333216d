import { describe, expect, it } from 'vitest'
import { attributeHeadline } from '../../../server/analysis/headline.ts'
import type { RecipeMean } from '../../../server/analysis/index.ts'

// The headline reads the compact letters: recipes sharing a letter are not found different.

const mean = (name: string, value: number | null, letters: string | null): RecipeMean => ({
  recipe: name,
  name,
  n: value === null ? 0 : 10,
  mean: value,
  sd: null,
  ci: null,
  letters,
  reason: null,
})

describe('the attribute headline', () => {
  it('names a clear winner', () => {
    expect(
      attributeHeadline('brightness', [
        mean('B', 60, 'b'),
        mean('A', 79.1, 'a'),
        mean('C', 50, 'c'),
      ]),
    ).toBe('A is rated highest on brightness (mean 79.1), clearly above every other recipe.')
  })

  it('names a top group the panel does not tell apart, and claims only what the top shows', () => {
    // a, ab, b: A and B share a letter; C differs from A only.
    expect(
      attributeHeadline('warmth', [mean('A', 70, 'a'), mean('B', 65, 'ab'), mean('C', 50, 'b')]),
    ).toBe(
      'A (mean 70.0) and B (mean 65.0) are rated highest on warmth, and the panel does not tell ' +
        'them apart; A is clearly above C.',
    )
  })

  it('says when nothing differs, nobody rated, or pairs are untested', () => {
    expect(attributeHeadline('focus', [mean('A', 52, 'a'), mean('B', 48.2, 'a')])).toBe(
      "No clear differences on focus: the recipes' means run from 48.2 to 52.0, and no pair differs clearly.",
    )
    expect(attributeHeadline('focus', [mean('A', null, null)])).toBe('Nobody has rated focus yet.')
    expect(attributeHeadline('focus', [mean('A', 40, 'a'), mean('B', null, null)])).toBe(
      'Only A has been rated on focus so far (mean 40.0).',
    )
  })
})
