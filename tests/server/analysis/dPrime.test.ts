import { describe, expect, it } from 'vitest'
import {
  triangleDPrime,
  triangleDPrimeFromPc,
  trianglePc,
} from '../../../server/analysis/dPrime.ts'
import fixture from './fixtures/triangleDPrime.json'

// The triangle's psychometric function against R 4.2.2's integrate() of the same integral, and
// d′ against uniroot() on it (fixtures/triangleDPrime.R beside the JSON), the interval through
// binom.test's exact interval.

describe('the triangle psychometric function', () => {
  it('matches R’s integrate() to 1e-10 from d′ 0 to 6', () => {
    for (const r of fixture.pc) expect(Math.abs(trianglePc(r.dPrime) - r.pc)).toBeLessThan(1e-10)
  })

  it('is 1/3 at d′ = 0: guessing (ISO 4120)', () => {
    expect(trianglePc(0)).toBeCloseTo(1 / 3, 14)
  })

  it('matches a published d′ table for the triangle method (values from memory)', () => {
    // Ennis (1993), J. Sensory Studies 8:353, triangle: pc 0.418 at d′ = 1, and pc = 0.5 at
    // d′ ≈ 1.47 (both from memory, to the table's printed precision).
    expect(trianglePc(1)).toBeCloseTo(0.418, 3)
    expect(triangleDPrimeFromPc(0.5)).toBeCloseTo(1.47, 2)
  })

  it('inverts to R’s uniroot() d′ to 1e-9, and round-trips', () => {
    for (const r of fixture.inverse) {
      expect(Math.abs((triangleDPrimeFromPc(r.pc) as number) - r.dPrime)).toBeLessThan(1e-9)
    }
    for (const d of [0.2, 1.3, 2.7, 4.4]) {
      expect(triangleDPrimeFromPc(trianglePc(d))).toBeCloseTo(d, 9)
    }
  })
})

describe('d′ of a triangle session', () => {
  it('gives d′ and its interval through the exact interval of the share, as R', () => {
    for (const r of fixture.counts) {
      const result = triangleDPrime(r.correct, r.n)
      expect(Math.abs((result.dPrime as number) - r.dPrime)).toBeLessThan(1e-9)
      expect(Math.abs((result.ci?.lower as number) - r.lower)).toBeLessThan(1e-9)
      expect(Math.abs((result.ci?.upper as number) - r.upper)).toBeLessThan(1e-9)
      expect(result.ci!.lower).toBeLessThanOrEqual(result.dPrime as number)
    }
  })

  it('says so in words, with the interval', () => {
    // 18 of 30: R gives d′ = 1.9756 (uniroot on the integral above).
    expect(triangleDPrime(18, 30).sentence).toMatch(
      /^d′ = 1\.98 \(95% CI \d\.\d\d to \d\.\d\d\): a clear difference/,
    )
  })

  it('has no upper bound when every answer is correct, and no number without answers', () => {
    const all = triangleDPrime(12, 12)
    expect(all).toMatchObject({ dPrime: null, reason: 'no finite estimate' })
    expect(all.ci?.upper).toBeNull()
    expect(all.ci!.lower).toBeGreaterThan(1)
    expect(all.sentence).toMatch(/no upper bound/)
    expect(triangleDPrime(0, 0)).toMatchObject({ dPrime: null, ci: null, reason: 'no answers' })
    expect(triangleDPrime(2, 12)).toMatchObject({ dPrime: 0 })
    expect(() => triangleDPrime(13, 12)).toThrow(/from 0 to n/)
    expect(() => trianglePc(NaN)).toThrow(/d′/)
  })
})
