import binomialTestStdlib from '@stdlib/stats-binomial-test'
import { describe, expect, it } from 'vitest'
import { binomialTest, clopperPearson, signTest } from '../../../server/analysis/index.ts'
import { seeded } from './random.ts'

describe('binomialTest', () => {
  it('reproduces Conover (1971) p. 97: 682 of 925 against p0 = 0.75', () => {
    const r = binomialTest(682, 925, { p0: 0.75 })
    // Source: R binom.test.Rd / stats-Ex.Rout.save: p-value = 0.3825,
    // 95% CI 0.7076683 to 0.7654066 (Clopper–Pearson).
    expect(r.p).toBeCloseTo(0.3825, 4)
    expect(r.ci?.lower).toBeCloseTo(0.7076683, 7)
    expect(r.ci?.upper).toBeCloseTo(0.7654066, 7)
    expect(r.estimate).toBeCloseTo(682 / 925, 12)
  })

  it('gives exact sign-test p-values that can be checked by hand', () => {
    // Computed: 9 of 10 preferring one side, two-sided p = 2·(1 + 10)/1024 = 22/1024.
    expect(signTest(9, 1).p).toBeCloseTo(22 / 1024, 12)
    // Computed: 10 of 10, p = 2/1024; Clopper–Pearson lower bound is 0.025^(1/10).
    const all = signTest(10, 0, 3)
    expect(all.p).toBeCloseTo(2 / 1024, 12)
    expect(all.ci?.lower).toBeCloseTo(0.025 ** (1 / 10), 9)
    expect(all.ci?.upper).toBe(1)
    expect(all.ties).toBe(3)
  })

  it('agrees with @stdlib/stats-binomial-test on seeded random counts', () => {
    const rng = seeded(42)
    for (let trial = 0; trial < 40; trial++) {
      const n = 1 + Math.floor(rng.uniform() * 300)
      const p0 = [0.5, 1 / 3, 0.75, 0.2][trial % 4]
      const x = Math.floor(rng.uniform() * (n + 1))
      const ours = binomialTest(x, n, { p0 })
      // Independent check: @stdlib/stats-binomial-test (R's binom.test rules).
      const theirs = binomialTestStdlib(x, n, { p: p0 })
      expect(ours.p).toBeCloseTo(theirs.pValue, 9)
      expect(ours.ci?.lower).toBeCloseTo(theirs.ci[0], 9)
      expect(ours.ci?.upper).toBeCloseTo(theirs.ci[1], 9)
    }
  })

  it('supports one-sided alternatives', () => {
    // Computed: P(X ≥ 8 | n = 10, 0.5) = (45 + 10 + 1) / 1024.
    expect(binomialTest(8, 10, { alternative: 'greater' }).p).toBeCloseTo(56 / 1024, 12)
    expect(binomialTest(2, 10, { alternative: 'less' }).p).toBeCloseTo(56 / 1024, 12)
  })

  it('gives its own reason when nobody expressed a preference, and refuses impossible counts', () => {
    expect(signTest(0, 0, 5)).toMatchObject({
      n: 0,
      p: null,
      ci: null,
      reason: 'every answer was no preference',
    })
    expect(signTest(0, 0)).toMatchObject({ n: 0, p: null, reason: 'no answers' })
    expect(() => binomialTest(3, 2)).toThrow(/from 0 to n/)
    expect(() => binomialTest(1.5, 2)).toThrow(/whole number/)
    expect(() => binomialTest(1, NaN)).toThrow(/whole number/)
    expect(() => binomialTest(1, 2, { p0: 1 })).toThrow(/p0/)
    expect(clopperPearson(0, 0)).toBeNull()
  })
})
