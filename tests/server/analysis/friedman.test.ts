import { describe, expect, it } from 'vitest'
import { friedman } from '../../../server/analysis/index.ts'
import { roundingTimes } from './roundingTimes.ts'
import tails from './fixtures/friedmanTails.json'

describe('friedman', () => {
  it('reproduces R friedman.test(RoundingTimes), with its ties', () => {
    const r = friedman(roundingTimes)
    // Source: R friedman.test.Rd: Friedman chi-squared = 11.143, df = 2, p-value = 0.003805.
    expect(r.chiSquare).toBeCloseTo(11.143, 3)
    expect(r.df).toBe(2)
    expect(r.p).toBeCloseTo(0.003805, 6)
    // Computed from the ranks (see /work/shared/REFERENCES.md): rank sums 53, 47, 32.
    expect(r.rankSums).toEqual([53, 47, 32])
    // Kendall's W = chi² / (n (k − 1)) = 11.143 / 44 (REFERENCES.md: 0.2532).
    expect(r.kendallW).toBeCloseTo(0.2532, 4)
  })

  it('gives W = 1 when every player ranks the recipes the same way', () => {
    // Computed: perfect concordance without ties gives chi² = n (k − 1), so W = 1.
    const r = friedman([
      [1, 2, 3, 4],
      [10, 20, 30, 40],
      [5, 6, 7, 8],
    ])
    expect(r.chiSquare).toBeCloseTo(9, 12)
    expect(r.kendallW).toBeCloseTo(1, 12)
  })

  it('returns reasons instead of NaN on bad input', () => {
    expect(friedman([])).toMatchObject({
      chiSquare: null,
      p: null,
      reason: 'fewer than three recipes',
    })
    expect(friedman([[1, 2, 3]])).toMatchObject({
      p: null,
      reason: 'fewer than two players rated every recipe',
    })
    expect(() =>
      friedman([
        [1, 2, 3],
        [1, 2],
      ]),
    ).toThrow(/one value per recipe/)
    expect(() =>
      friedman([
        [1, 2, 3],
        [1, NaN, 3],
      ]),
    ).toThrow(/complete and finite/)
    expect(
      friedman([
        [1, 2],
        [2, 1],
      ]),
    ).toMatchObject({ reason: 'fewer than three recipes' })
    expect(
      friedman([
        [50, 50, 50],
        [70, 70, 70],
      ]),
    ).toMatchObject({ chiSquare: null, p: null, kendallW: null, reason: 'no variance' })
  })
})

describe('friedman far in the tail', () => {
  // R 4.2.2 friedman.test on fixtures/friedmanTails.R's matrices: 40 players who all rank three
  // recipes one way (χ² = 80, p = 4.25e-18, where 1 − cdf gives 0), and 25 of whom one swaps two.
  it('keeps the p as R computes it, not 1 − a number next to 1', () => {
    for (const c of tails.cases) {
      const r = friedman(c.rows)
      expect(r.chiSquare).toBeCloseTo(c.chiSquare, 10)
      expect(Math.abs((r.p as number) / c.p - 1)).toBeLessThan(1e-10)
    }
  })
})
