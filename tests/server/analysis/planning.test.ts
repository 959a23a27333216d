import { describe, expect, it } from 'vitest'
import {
  pairedTSampleSize,
  signTestPower,
  signTestSampleSize,
  trianglePower,
  triangleSampleSize,
} from '../../../server/analysis/index.ts'

describe('pairedTSampleSize', () => {
  it('plans 10 players for a difference of one SD at alpha 0.05 and power 0.8', () => {
    // R power.t.test(delta = 1, sd = 1, power = 0.8, type = "paired") gives n = 9.94, i.e. 10
    // players (from memory); re-checked with SciPy's noncentral t during development:
    // power 0.748 at n = 9 and 0.803 at n = 10.
    const plan = pairedTSampleSize({ difference: 10, sd: 10 })
    expect(plan.n).toBe(10)
    expect(plan.power).toBeGreaterThanOrEqual(0.8)
  })

  it('plans 34 players for half an SD', () => {
    // SciPy noncentral t during development: power 0.7954 at n = 33, 0.8078 at n = 34
    // (R power.t.test gives 33.37, so 34; from memory).
    expect(pairedTSampleSize({ difference: 5, sd: 10 }).n).toBe(34)
  })

  it('needs more players for a stricter alpha or higher power', () => {
    const base = pairedTSampleSize({ difference: 5, sd: 12 }).n as number
    expect(pairedTSampleSize({ difference: 5, sd: 12, alpha: 0.01 }).n).toBeGreaterThan(base)
    expect(pairedTSampleSize({ difference: 5, sd: 12, power: 0.9 }).n).toBeGreaterThan(base)
  })

  it('returns reasons instead of NaN or an endless loop', () => {
    expect(pairedTSampleSize({ difference: 0, sd: 10 })).toMatchObject({
      n: null,
      reason: 'no difference to detect',
    })
    expect(pairedTSampleSize({ difference: 5, sd: 0 })).toMatchObject({
      n: null,
      reason: 'no variance',
    })
    expect(() => pairedTSampleSize({ difference: 5, sd: 10, power: 1.2 })).toThrow(/power/)
    expect(() => pairedTSampleSize({ difference: NaN, sd: 10 })).toThrow(/finite/)
  })
})

describe('signTestSampleSize', () => {
  it('finds the smallest n whose exact power reaches the target', () => {
    const plan = signTestSampleSize({ share: 0.7 })
    const n = plan.n as number
    // Computed from the definition: exact power at n reaches 0.8, at n − 1 it does not.
    expect(signTestPower(n, 0.7)).toBeGreaterThanOrEqual(0.8)
    expect(signTestPower(n - 1, 0.7)).toBeLessThan(0.8)
    // Normal approximation ((1.96·0.5 + 0.84·√0.21)/0.2)² ≈ 46.4 (computed): exact is close.
    expect(n).toBeGreaterThan(40)
    expect(n).toBeLessThan(60)
  })

  it('computes exact power by hand for a small case', () => {
    // Computed: n = 6 rejects only at 0 or 6 (2/64 ≤ 0.05), so power at share 0.9 is
    // 0.9^6 + 0.1^6.
    expect(signTestPower(6, 0.9)).toBeCloseTo(0.9 ** 6 + 0.1 ** 6, 12)
    expect(signTestPower(5, 0.9)).toBe(0)
  })

  it('refuses a share of one half', () => {
    expect(signTestSampleSize({ share: 0.5 })).toMatchObject({
      n: null,
      reason: 'no difference to detect',
    })
  })
})

describe('triangleSampleSize', () => {
  it('finds the smallest number of answers with enough power for a given pd', () => {
    const plan = triangleSampleSize({ pd: 0.3 })
    const n = plan.n as number
    // Computed from the definition: the exact power crosses 0.8 at n.
    expect(trianglePower(n, 0.3)).toBeGreaterThanOrEqual(0.8)
    expect(trianglePower(n - 1, 0.3)).toBeLessThan(0.8)
  })

  it('needs fewer answers for a larger pd', () => {
    const small = triangleSampleSize({ pd: 0.2 }).n as number
    const large = triangleSampleSize({ pd: 0.5 }).n as number
    expect(large).toBeLessThan(small)
  })

  it('returns a reason for pd = 0', () => {
    expect(triangleSampleSize({ pd: 0 })).toMatchObject({
      n: null,
      reason: 'no difference to detect',
    })
    expect(() => triangleSampleSize({ pd: 1.5 })).toThrow(/between 0 and 1/)
  })
})
