import ttest from '@stdlib/stats-ttest'
import { describe, expect, it } from 'vitest'
import { oneSampleT, pairedTTest } from '../../../server/analysis/index.ts'
import { seeded } from './random.ts'

// Student's sleep data (R datasets `sleep`), extra hours of sleep for the same ten patients.
const sleep1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0]
const sleep2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4]

describe('pairedTTest', () => {
  it('reproduces the sleep example of R t.test(paired = TRUE)', () => {
    const r = pairedTTest(sleep1, sleep2)
    // Source: R t.test.Rd on `sleep`: t = -4.0621, df = 9, p-value = 0.002833,
    // 95% CI -2.4598858 to -0.7001142, mean difference -1.58.
    expect(r.t).toBeCloseTo(-4.0621, 4)
    expect(r.df).toBe(9)
    expect(r.p).toBeCloseTo(0.002833, 6)
    expect(r.ci?.lower).toBeCloseTo(-2.4598858, 6)
    expect(r.ci?.upper).toBeCloseTo(-0.7001142, 6)
    expect(r.meanDifference).toBeCloseTo(-1.58, 10)
    expect(r.reason).toBeNull()
  })

  it('gives Cohen dz as mean difference over SD of differences', () => {
    const r = pairedTTest(sleep1, sleep2)
    // Computed from the definition: SD of the sleep differences is 1.229995.
    expect(r.sdDifference).toBeCloseTo(1.229995, 5)
    expect(r.dz).toBeCloseTo(-1.58 / 1.229995, 5)
  })

  it('agrees with @stdlib/stats-ttest on seeded random panels', () => {
    const rng = seeded(20240611)
    for (let trial = 0; trial < 25; trial++) {
      const n = 3 + Math.floor(rng.uniform() * 80)
      const x = Array.from({ length: n }, () => rng.normal(50, 15))
      const y = x.map((v) => v + rng.normal(rng.uniform() * 6 - 3, 8))
      const ours = pairedTTest(x, y)
      // Independent check: @stdlib's paired ttest.
      const theirs = ttest(x, y)
      expect(ours.t).toBeCloseTo(theirs.statistic, 9)
      expect(ours.p).toBeCloseTo(theirs.pValue, 9)
      expect(ours.ci?.lower).toBeCloseTo(theirs.ci[0], 9)
      expect(ours.ci?.upper).toBeCloseTo(theirs.ci[1], 9)
    }
  })

  it('gives its own reason for no pairs or a single pair instead of NaN', () => {
    expect(pairedTTest([], [])).toMatchObject({
      n: 0,
      t: null,
      p: null,
      reason: 'no player rated both',
    })
    const one = pairedTTest([60], [50])
    expect(one).toMatchObject({
      n: 1,
      meanDifference: 10,
      p: null,
      reason: 'only one player rated both',
    })
  })

  it('refuses unequal lengths and non-finite values with a clear error', () => {
    expect(() => pairedTTest([1, 2, 3], [1, 2])).toThrow(/same length \(3 and 2\)/)
    expect(() => pairedTTest([1, NaN, 3], [1, 2, 4])).toThrow(/finite/)
    expect(() => oneSampleT([1, Infinity, 3])).toThrow(/entry 1 is Infinity/)
  })

  it('says "no variance" when every difference is the same', () => {
    expect(pairedTTest([50, 60, 70], [50, 60, 70])).toMatchObject({
      meanDifference: 0,
      t: null,
      p: null,
      reason: 'no variance',
    })
    expect(pairedTTest([55, 65, 75], [50, 60, 70])).toMatchObject({
      meanDifference: 5,
      p: null,
      reason: 'no variance',
    })
  })
})
