import { describe, expect, it } from 'vitest'
import {
  binomialTest,
  oneSampleT,
  triangleTest,
  wilcoxonSignedRank,
} from '../../../server/analysis/index'
import normalCdf from '@stdlib/stats-base-dists-normal-cdf'
import fixture from './fixtures/tails.json'

// Far tails against R 4.2.2, made by fixtures/tails.R beside the JSON: pt(−t, df),
// pnorm(−z), pbinom(x − 1, n, p, lower.tail = FALSE) and psignrank(v − 1, n,
// lower.tail = FALSE). Each p is taken from the engine's own test functions, so a p computed
// as 1 − cdf (which reads 0 or a rounding step below about 1e-16) fails here.

const relative = (ours: number | null, theirs: number) => Math.abs((ours ?? NaN) / theirs - 1)

/** n differences whose one-sample t is exactly `t` on n − 1 df: mean m, SD 1. */
function differencesWithT(t: number, df: number): number[] {
  const n = df + 1
  const centred = Array.from({ length: n }, (_, i) => i - (n - 1) / 2)
  const sd = Math.sqrt(centred.reduce((s, v) => s + v * v, 0) / (n - 1))
  const mean = (t * 1) / Math.sqrt(n)
  return centred.map((v) => v / sd + mean)
}

describe('upper tails as survival functions, against R', () => {
  it('one-sided paired t p matches pt(−t, df) to 1e-9 relative, out to 1e-142', () => {
    let worst = 0
    for (const r of fixture.t) {
      const p = oneSampleT(differencesWithT(r.t, r.df), { alternative: 'greater' }).p
      worst = Math.max(worst, relative(p, r.lower))
    }
    expect(worst).toBeLessThan(1e-9)
  })

  it('the normal lower tail matches pnorm(−z) to 1e-12 relative, out to 1e-300', () => {
    for (const r of fixture.z) expect(relative(normalCdf(-r.z, 0, 1), r.lower)).toBeLessThan(1e-12)
  })

  it('one-sided binomial and triangle p match pbinom(…, lower.tail = FALSE) to 1e-12', () => {
    for (const r of fixture.binomial) {
      const p = binomialTest(r.x, r.n, { p0: r.p, alternative: 'greater' }).p
      expect(relative(p, r.upper)).toBeLessThan(1e-12)
    }
    const third = fixture.binomial.filter((r) => Math.abs(r.p - 1 / 3) < 1e-12)
    for (const r of third) expect(relative(triangleTest(r.x, r.n).p, r.upper)).toBeLessThan(1e-12)
  })

  it('exact Wilcoxon upper tail matches psignrank(v − 1, n, lower.tail = FALSE), n to 80', () => {
    let worst = 0
    for (const r of fixture.signedRank) {
      // Differences 1…n, the largest ones positive, so V is the sum of those ranks.
      const d = Array.from({ length: r.n }, (_, i) => i + 1)
      let rest = r.v
      for (let i = r.n - 1; i >= 0; i--) {
        if (d[i] <= rest) rest -= d[i]
        else d[i] = -d[i]
      }
      expect(rest).toBe(0)
      const result = wilcoxonSignedRank(d, undefined, { alternative: 'greater', exact: true })
      expect(result.V).toBe(r.v)
      worst = Math.max(worst, relative(result.p, r.upper))
    }
    expect(worst).toBeLessThan(1e-12)
  })
})
