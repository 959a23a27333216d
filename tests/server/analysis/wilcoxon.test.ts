import wilcoxon from '@stdlib/stats-wilcoxon'
import { describe, expect, it } from 'vitest'
import {
  signedRankCdf,
  wilcoxonCriticalT,
  wilcoxonSignedRank,
} from '../../../server/analysis/index.ts'
import { seeded } from './random.ts'
import ties from './fixtures/wilcoxonTies.json'

// Hollander & Wolfe (1973): paired depression-scale scores of nine patients at two visits, as
// quoted in R's wilcox.test.Rd (see /work/shared/REFERENCES.md).
const x = [1.83, 0.5, 1.62, 2.48, 1.68, 1.88, 1.55, 3.06, 1.3]
const y = [0.878, 0.647, 0.598, 2.05, 1.06, 1.29, 1.06, 3.14, 1.29]

describe('wilcoxonSignedRank against R', () => {
  it('matches the exact one-sided test of the Hollander & Wolfe example', () => {
    const r = wilcoxonSignedRank(x, y, { alternative: 'greater' })
    // Source: R wilcox.test.Rd: V = 40, p-value = 0.01953 (= 10/512).
    expect(r.V).toBe(40)
    expect(r.method).toBe('exact')
    expect(r.p).toBeCloseTo(10 / 512, 12)
  })

  it('matches the exact two-sided p of the same example', () => {
    // Source: R wilcox.test(x, y, paired = TRUE): p-value = 0.03906 (= 20/512).
    expect(wilcoxonSignedRank(x, y).p).toBeCloseTo(0.0390625, 12)
  })

  it('matches the normal approximation without continuity correction', () => {
    const r = wilcoxonSignedRank(y, x, { alternative: 'less', exact: false, correct: false })
    // Source: R wilcox.test.Rd, y − x, "less", exact = FALSE, correct = FALSE: V = 5,
    // p-value = 0.01908.
    expect(r.V).toBe(5)
    expect(r.method).toBe('normal')
    expect(r.p).toBeCloseTo(0.01908, 5)
  })

  it('gives the matched-pairs rank-biserial correlation', () => {
    // Computed from the definition (Kerby 2014): V = 40 of 45, so (40 − 5) / 45.
    expect(wilcoxonSignedRank(x, y).rankBiserial).toBeCloseTo(35 / 45, 12)
  })
})

describe('exact signed-rank distribution', () => {
  // Standard two-sided critical-value tables of T (reject when T ≤ value); exact enumeration
  // agrees (see /work/shared/REFERENCES.md).
  const table05 = [0, 2, 3, 5, 8, 10, 13, 17, 21, 25, 29, 34, 40, 46, 52, 58, 65, 73, 81, 89]
  const table01 = [0, 1, 3, 5, 7, 9, 12, 15, 19, 23, 27, 32, 37, 42, 48, 54, 61, 68]

  it('reproduces the critical T table at two-sided 0.05 for n = 6 to 25', () => {
    const ours = table05.map((_, i) => wilcoxonCriticalT(i + 6, 0.05))
    expect(ours).toEqual(table05)
  })

  it('reproduces the critical T table at two-sided 0.01 for n = 8 to 25', () => {
    const ours = table01.map((_, i) => wilcoxonCriticalT(i + 8, 0.01))
    expect(ours).toEqual(table01)
  })

  it('has no critical value where tables print a dash', () => {
    // Standard tables: no two-sided 0.05 test is possible with 5 pairs (2/32 > 0.05).
    expect(wilcoxonCriticalT(5, 0.05)).toBeNull()
  })

  it('sums to one and is symmetric', () => {
    // Computed: the null distribution of V is symmetric about n(n + 1)/4.
    expect(signedRankCdf(49 * 25, 49)).toBe(1)
    expect(signedRankCdf(10, 12) + signedRankCdf(78 - 11, 12)).toBeCloseTo(1, 12)
  })
})

describe('wilcoxonSignedRank against @stdlib/stats-wilcoxon (seeded random data)', () => {
  const rng = seeded(7)
  const cases = [
    { n: 12, rounded: false },
    { n: 30, rounded: false },
    { n: 49, rounded: false },
    { n: 60, rounded: false },
    { n: 25, rounded: true },
    { n: 80, rounded: true },
    { n: 400, rounded: true },
  ]
  it.each(cases)('n = $n, ties and zeros: $rounded', ({ n, rounded }) => {
    const d = Array.from({ length: n }, () => {
      const v = rng.normal(1.5, 6)
      return rounded ? Math.round(v) : v
    })
    const ours = wilcoxonSignedRank(d)
    // Independent check: @stdlib/stats-wilcoxon (R's rules: exact below 50 without ties,
    // otherwise normal with tie and continuity correction; zeros dropped).
    const theirs = wilcoxon(d)
    expect(ours.V).toBeCloseTo(theirs.statistic, 9)
    expect(ours.p).toBeCloseTo(theirs.pValue, 9)
    expect(ours.method).toBe(n < 50 && !rounded ? 'exact' : 'normal')
  })
})

describe('wilcoxonSignedRank on bad input', () => {
  it('refuses unequal lengths and non-finite values with a clear error', () => {
    expect(() => wilcoxonSignedRank([1, 2, 3], [1, 2])).toThrow(/same length/)
    expect(() => wilcoxonSignedRank([1, NaN, 3])).toThrow(/finite/)
    expect(() => wilcoxonSignedRank([1, 2], [1, Infinity])).toThrow(/finite/)
  })

  it('says "no player rated both" for no pairs', () => {
    expect(wilcoxonSignedRank([], [])).toMatchObject({
      n: 0,
      V: null,
      p: null,
      reason: 'no player rated both',
    })
  })

  it('returns "no variance" when every difference is zero (R drops zeros and has nothing left)', () => {
    expect(wilcoxonSignedRank([5, 5, 5], [5, 5, 5])).toMatchObject({
      n: 0,
      zeros: 3,
      p: null,
      reason: 'no variance',
    })
  })

  it('switches to the normal approximation when zeros are present, as R does', () => {
    const r = wilcoxonSignedRank([1, 2, 3, 0, 4])
    expect(r).toMatchObject({ n: 4, zeros: 1, method: 'normal' })
  })

  it('handles a single pair and all-tied magnitudes without NaN', () => {
    expect(Number.isFinite(wilcoxonSignedRank([3]).p)).toBe(true)
    const tied = wilcoxonSignedRank([2, 2, 2, -2, 2, 2])
    expect(tied.method).toBe('normal')
    expect(Number.isFinite(tied.p)).toBe(true)
  })
})

describe('ties at the ratings’ own precision', () => {
  // Whole-point ratings of 12 players over three clips per recipe, averaged per player as the
  // findings do. R 4.2.2: wilcox.test(ma, mb, paired = TRUE, digits.rank = 7) gives V = 64,
  // p = 0.0544; with digits.rank = Inf the last bits of the means break true ties: V = 64.5,
  // p = 0.0498 (fixtures/wilcoxonTies.R).
  const means = (m: number[][]) => m.map((r) => (r[0] + r[1] + r[2]) / 3)
  const a = means(ties.a)
  const b = means(ties.b)

  it('ranks at 7 significant digits by default, as R’s digits.rank = 7', () => {
    const r = wilcoxonSignedRank(a, b)
    expect(r.V).toBe(ties.digitsRank7.V)
    expect(Math.abs((r.p as number) / ties.digitsRank7.p - 1)).toBeLessThan(1e-12)
  })

  it('ranks the values as computed when asked to, as R’s digits.rank = Inf', () => {
    const r = wilcoxonSignedRank(a, b, { digitsRank: Infinity })
    expect(r.V).toBe(ties.digitsRankInf.V)
    expect(Math.abs((r.p as number) / ties.digitsRankInf.p - 1)).toBeLessThan(1e-12)
  })
})
