import { describe, expect, it } from 'vitest'
import { pairedTPower, pairedTSampleSize } from '../../../server/analysis/planning'
import { noncentralTCdf } from '../../../server/analysis/noncentralT'
import fixture from './fixtures/pairedTPower.json'

// Reference values from R's stats package (R 4.2.2), made by fixtures/pairedTPower.R beside
// the JSON: pt(q, df, ncp, lower.tail), the defining integral of the far upper tail, and
// power.t.test(n, delta, sd, sig.level, type = "paired") with its n (the ceiling of the n
// uniroot finds).

const relative = (ours: number, theirs: number) => Math.abs(ours / theirs - 1)

describe('the noncentral t against R', () => {
  it('matches pt(q, df, ncp) on a grid of both tails to 1e-11 absolute', () => {
    let worst = 0
    for (const r of fixture.pt) {
      const ours = noncentralTCdf(r.q, r.df, r.ncp, r.lowerTail)
      worst = Math.max(worst, Math.abs(ours - r.p))
    }
    expect(worst).toBeLessThan(1e-11)
  })

  it('keeps far upper tails to 1e-9 relative, where 1 − lower would lose them', () => {
    let worst = 0
    for (const r of fixture.upperTail)
      if (r.p > 0) worst = Math.max(worst, relative(noncentralTCdf(r.q, r.df, r.ncp, false), r.p))
    expect(worst).toBeLessThan(1e-9)
  })
})

describe('paired-t power and players against R power.t.test(type = "paired")', () => {
  it('gives R’s power to 1e-6 for every plan', () => {
    for (const r of fixture.power)
      expect(Math.abs(pairedTPower(r.n, r.delta / r.sd, r.alpha) - r.power)).toBeLessThan(1e-6)
  })

  it('asks for R’s number of players for every plan', () => {
    for (const r of fixture.sampleSize) {
      const plan = pairedTSampleSize({
        difference: r.delta,
        sd: r.sd,
        alpha: r.alpha,
        power: r.target,
      })
      expect(plan.n, JSON.stringify(r)).toBe(r.n)
      expect(Math.abs((plan.power as number) - r.powerAtN)).toBeLessThan(1e-6)
    }
  })

  it('needs 8 players, not 7, for a difference of 30 with SD 15 at α 0.01 and power 0.9', () => {
    // R: power.t.test(n = 7, delta = 30, sd = 15, sig.level = 0.01, type = "paired")$power
    // is 0.883, below 0.9; the shifted central t claimed 0.918 at 7.
    expect(pairedTPower(7, 2, 0.01)).toBeLessThan(0.9)
    expect(pairedTSampleSize({ difference: 30, sd: 15, alpha: 0.01, power: 0.9 }).n).toBe(8)
  })
})

describe('powers that round to 1', () => {
  it('answers at once, as R does, where the series would need millions of terms', () => {
    // R 4.2.2: pt(2, 30, 20, lower.tail = FALSE) = 1 and
    // power.t.test(n = 1000, delta = 10, sd = 12, sig.level = 0.05/45, type = "paired")$power = 1.
    expect(noncentralTCdf(2, 30, 20, false)).toBe(1)
    expect(pairedTPower(1000, 10 / 12, 0.05 / 45)).toBe(1)
    // Just short of 1 the series still runs: pt(qt(0.9995, 99), 99, 8, lower.tail = FALSE).
    expect(relative(pairedTPower(100, 0.8, 0.001), 0.99999636941020664)).toBeLessThan(1e-9)
  })
})
