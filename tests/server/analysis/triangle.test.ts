import { describe, expect, it } from 'vitest'
import {
  proportionDiscriminators,
  triangleMinimumCorrect,
  triangleTest,
} from '../../../server/analysis/index.ts'

// ISO 4120 minimum number of correct answers for a triangle test (also the FAO sensory
// manual table), one-sided, p0 = 1/3.
const isoTable = [
  { n: 6, at05: 5, at01: 6 },
  { n: 10, at05: 7, at01: 8 },
  { n: 12, at05: 8, at01: 9 },
  { n: 20, at05: 11, at01: 13 },
  { n: 24, at05: 13, at01: 15 },
  { n: 30, at05: 15, at01: 17 },
  { n: 36, at05: 18, at01: 20 },
]

describe('triangle test', () => {
  it.each(isoTable)(
    'minimum correct for n = $n matches the ISO 4120 table',
    ({ n, at05, at01 }) => {
      expect(triangleMinimumCorrect(n, 0.05)).toBe(at05)
      expect(triangleMinimumCorrect(n, 0.01)).toBe(at01)
      const r = triangleTest(at05, n)
      expect(r.minimumCorrect05).toBe(at05)
      expect(r.minimumCorrect01).toBe(at01)
      expect(r.p).toBeLessThanOrEqual(0.05)
      expect(triangleTest(at05 - 1, n).p).toBeGreaterThan(0.05)
    },
  )

  it('gives the exact one-sided p against guessing', () => {
    // Computed: P(X ≥ 5 | n = 6, 1/3) = (6·2 + 1) / 3^6 = 13/729.
    expect(triangleTest(5, 6).p).toBeCloseTo(13 / 729, 12)
  })

  it('computes the proportion of discriminators by the ISO 4120 formula', () => {
    // ISO 4120: pd = 1.5·(x/n) − 0.5. 15 of 30 correct gives 0.25.
    const r = triangleTest(15, 30)
    expect(r.pd).toBeCloseTo(0.25, 12)
    expect(r.pdCi?.lower).toBe(0)
    expect(r.pdCi?.upper).toBeGreaterThan(0.25)
    expect(r.pdCi?.upper).toBeLessThan(1)
    // A share at or below guessing means no discriminators, not a negative share.
    expect(proportionDiscriminators(0.2)).toBe(0)
    expect(triangleTest(30, 30).pd).toBe(1)
  })

  it('says "no answers" for none, and refuses impossible counts', () => {
    expect(triangleTest(0, 0)).toMatchObject({ p: null, pd: null, reason: 'no answers' })
    expect(() => triangleTest(5, 3)).toThrow(/from 0 to n/)
    // Computed: with 2 answers even 2 correct has p = 1/9 > 0.05.
    expect(triangleMinimumCorrect(2, 0.05)).toBeNull()
  })
})
