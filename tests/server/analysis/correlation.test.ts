import { sampleRankCorrelation } from 'simple-statistics'
import { describe, expect, it } from 'vitest'
import {
  objectiveVsPerceived,
  pearson,
  spearman,
  type ClipMeasure,
  type Rating,
} from '../../../server/analysis/index.ts'
import { seeded } from './random.ts'
import { pearsonTest } from '../../../server/analysis/pearsonTest.ts'
import fixture from './fixtures/correlations.json'

const relative = (ours: number | null, theirs: number) =>
  theirs === 0 ? Math.abs(ours ?? NaN) : Math.abs((ours ?? NaN) / theirs - 1)

// R 4.2.2's cor.test, made by fixtures/correlations.R beside the JSON.
describe('correlations against R', () => {
  it("gives Spearman's p as cor.test(method = 'spearman'): every ordering, AS 89, t", () => {
    let worst = 0
    for (const c of fixture.spearman) {
      const result = spearman(c.x, c.y)
      expect(Math.abs((result.r as number) - c.rho)).toBeLessThan(1e-12)
      worst = Math.max(worst, relative(result.p, c.p))
      const n = c.x.length
      const expected = c.ties || n > 1290 ? 't' : n <= 9 ? 'exact' : 'series'
      expect(result.method, `n = ${n}`).toBe(expected)
    }
    expect(worst).toBeLessThan(1e-9)
  })

  it("gives Pearson's r, t, p and Fisher-z interval as cor.test(x, y)", () => {
    for (const c of fixture.pearson) {
      const result = pearsonTest(c.x, c.y)
      expect(relative(result.r, c.r)).toBeLessThan(1e-12)
      expect(relative(result.t, c.t)).toBeLessThan(1e-10)
      expect(result.df).toBe(c.df)
      expect(relative(result.p, c.p)).toBeLessThan(1e-9)
      if (c.lower === null) expect(result.ci).toBeNull()
      else {
        expect(Math.abs(result.ci!.lower - (c.lower as number))).toBeLessThan(1e-12)
        expect(Math.abs(result.ci!.upper - (c.upper as number))).toBeLessThan(1e-12)
      }
    }
  })

  it('refuses unequal lengths and non-finite values with a clear error', () => {
    expect(() => spearman([1, 2, 3], [1, 2])).toThrow(/same length \(3 and 2\)/)
    expect(() => pearson([1, NaN, 3], [1, 2, 3])).toThrow(/finite/)
    expect(() => pearsonTest([1, 2, 3, 4], [1, 2, 3, Infinity])).toThrow(/finite/)
    expect(pearsonTest([1, 2], [2, 1])).toMatchObject({ r: null, reason: 'fewer than three pairs' })
  })
})

describe('spearman', () => {
  it('reproduces the exact small-sample example of R cor.test', () => {
    // Hollander & Wolfe (1973) data as printed in R cor.test.Rd (values from memory of the Rd).
    const x = [44.4, 45.9, 41.9, 53.3, 44.7, 44.1, 50.7, 45.2, 60.1]
    const y = [2.6, 3.1, 2.5, 5.0, 3.6, 4.0, 5.2, 2.8, 3.8]
    const r = spearman(x, y)
    // R cor.test(method = "spearman", alternative = "greater"): S = 48, p = 0.0484, rho = 0.6
    // (from memory; the exact count P(S ≤ 48) = 0.048399 was re-computed by enumerating all
    // 9! orderings in Python during development). Two-sided is twice that.
    expect(r.r).toBeCloseTo(0.6, 12)
    expect(r.method).toBe('exact')
    expect(r.p).toBeCloseTo(2 * 0.04839892, 7)
  })

  it('uses the t approximation for larger or tied samples', () => {
    const x = [12, 15, 11, 19, 14, 18, 13, 17, 16, 10, 20, 21, 9, 22, 23]
    const y = [3.1, 4.0, 2.9, 5.2, 3.3, 4.4, 3.0, 4.0, 4.8, 2.2, 5.0, 4.1, 2.5, 5.9, 4.9]
    const r = spearman(x, y)
    // Source: SciPy 1.17 scipy.stats.spearmanr on the same data (run during development):
    // rho = 0.9079538924922889, p = 2.8993331517431596e-06 (t approximation).
    expect(r.method).toBe('t')
    expect(r.r).toBeCloseTo(0.9079538924922889, 12)
    expect(r.p).toBeCloseTo(2.8993331517431596e-6, 12)
  })

  it('agrees with simple-statistics sampleRankCorrelation on seeded random data', () => {
    const rng = seeded(99)
    for (let trial = 0; trial < 20; trial++) {
      const n = 3 + Math.floor(rng.uniform() * 40)
      const x = Array.from({ length: n }, () => Math.round(rng.normal(50, 10)))
      const y = x.map((v) => Math.round(v + rng.normal(0, 12)))
      const rho = spearman(x, y).r
      // Independent check: simple-statistics (Pearson on average ranks).
      if (rho !== null) expect(rho).toBeCloseTo(sampleRankCorrelation(x, y), 9)
    }
  })

  it('returns reasons for too few or constant values', () => {
    expect(spearman([1, 2], [3, 4])).toMatchObject({
      r: null,
      p: null,
      reason: 'fewer than three pairs',
    })
    expect(spearman([1, 2, 3], [5, 5, 5])).toMatchObject({ r: null, reason: 'no variance' })
    expect(pearson([1, 1, 1], [1, 2, 3])).toBeNull()
  })

  it('computes Pearson r', () => {
    // Source: SciPy 1.17 scipy.stats.pearsonr (run during development): 0.7745966692414834.
    expect(pearson([1, 2, 3, 4, 5], [2, 4, 5, 4, 5])).toBeCloseTo(0.7745966692414834, 12)
  })
})

describe('objectiveVsPerceived', () => {
  // Five clips of five recipes: brightness ratings follow the spectral centroid exactly in
  // order, warmth runs against it.
  const centroids = [900, 1100, 1300, 1500, 1700]
  const measures: ClipMeasure[] = centroids.map((value, i) => ({
    clip: `c${i}`,
    recipe: `r${i}`,
    measure: 'spectral centroid',
    value,
  }))
  const ratings: Rating[] = []
  for (const player of ['p1', 'p2', 'p3']) {
    centroids.forEach((_, i) => {
      const clip = `c${i}`
      const recipe = `r${i}`
      ratings.push({ player, recipe, clip, attribute: 'brightness', value: 20 + 12 * i })
      ratings.push({ player, recipe, clip, attribute: 'warmth', value: 80 - 10 * i })
    })
  }

  it('correlates each measure with each attribute across clips', () => {
    const rows = objectiveVsPerceived(measures, ratings)
    const bright = rows.find((r) => r.attribute === 'brightness')
    const warm = rows.find((r) => r.attribute === 'warmth')
    // Computed: a perfectly monotone relation of 5 clips has rho = ±1 and exact two-sided
    // p = 2/5! = 1/60.
    expect(bright).toMatchObject({ measure: 'spectral centroid', n: 5, rho: 1 })
    expect(bright?.p).toBeCloseTo(1 / 60, 12)
    expect(warm?.rho).toBe(-1)
  })

  it('works per recipe when ratings do not name clips', () => {
    const withoutClips = ratings.map(({ clip: _clip, ...rest }) => rest)
    const rows = objectiveVsPerceived(measures, withoutClips)
    expect(rows.find((r) => r.attribute === 'brightness')?.rho).toBe(1)
  })

  it('returns a reason rather than NaN when there is nothing to correlate', () => {
    const rows = objectiveVsPerceived(measures.slice(0, 2), ratings)
    expect(rows.every((r) => r.rho === null && r.reason === 'fewer than three pairs')).toBe(true)
    expect(objectiveVsPerceived([], [])).toEqual([])
  })
})
