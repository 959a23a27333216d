import { describe, expect, it } from 'vitest'
import { preferenceFindings, type PreferenceAnswer } from '../../../server/analysis/index.ts'

function answers(first: string, second: string, firstWins: number, secondWins: number, none = 0) {
  const out: PreferenceAnswer[] = []
  let player = 0
  const add = (preferred: string | null, times: number) => {
    for (let i = 0; i < times; i++) out.push({ player: `p${player++}`, first, second, preferred })
  }
  add(first, firstWins)
  add(second, secondWins)
  add(null, none)
  return out
}

describe('preferenceFindings', () => {
  it('counts choices, sets "no preference" aside and runs the exact sign test', () => {
    const result = preferenceFindings(answers('A', 'B', 1, 9, 2), ['A', 'B'])
    const [pair] = result.pairs
    expect(pair).toMatchObject({ firstPreferred: 1, secondPreferred: 9, noPreference: 2 })
    // Computed: two-sided exact p for 1 of 10 is 2·11/1024; a family of one is not adjusted.
    expect(pair.test.p).toBeCloseTo(22 / 1024, 12)
    expect(pair.adjustedP).toBeCloseTo(22 / 1024, 12)
    expect(pair.sentence).toBe(
      'B was preferred in 9 of 10 choices (90%, 95% CI 55% to 100%), Holm p = 0.021; 2 had no preference.',
    )
  })

  it('feeds every choice into the Bradley–Terry scale', () => {
    const all = [...answers('A', 'B', 3, 7), ...answers('A', 'C', 2, 8), ...answers('B', 'C', 4, 6)]
    const { scale, pairs } = preferenceFindings(all, ['A', 'B', 'C'])
    expect(pairs).toHaveLength(3)
    expect(scale.reason).toBeNull()
    const [a, b, c] = scale.abilities
    expect(a.logAbility).toBe(0)
    expect(b.logAbility).toBeGreaterThan(0)
    expect(c.logAbility).toBeGreaterThan(b.logAbility as number)
  })

  it('gives a defined answer when nobody chose', () => {
    const result = preferenceFindings(answers('A', 'B', 0, 0, 4), ['A', 'B'])
    expect(result.pairs[0].test.reason).toBe('every answer was no preference')
    expect(result.pairs[0].sentence).toBe('No player chose between A and B; 4 had no preference.')
    expect(result.scale.reason).toBe('a recipe was never compared')
    expect(preferenceFindings([], []).pairs).toEqual([])
  })
})
