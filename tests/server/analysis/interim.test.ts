import { describe, expect, it } from 'vitest'
import { interimLook } from '../../../server/analysis/index.ts'
import type { PairRow } from '../../../server/analysis/index.ts'

// Players still needed, checked against R 4.2.2's power.t.test(type = "paired"), run as
//   r <- power.t.test(delta = d, sd = s, sig.level = a, power = 0.8, type = "paired"); ceiling(r$n)
//   power.t.test(n = 5, delta = d, sd = s, sig.level = a, type = "paired")$power
// with sig.level the session's 0.05 over the number of pairs (the strictest step of Holm and BH).

function pair(difference: number, sdDifference: number, n: number): PairRow {
  return {
    first: 'A',
    second: 'B',
    n,
    dropped: 0,
    difference,
    sdDifference,
    ci: null,
    t: null,
    df: null,
    p: null,
    adjustedP: null,
    wilcoxonV: null,
    wilcoxonP: null,
    wilcoxonMethod: null,
    wilcoxonAdjustedP: null,
    dz: null,
    rankBiserial: null,
    sentence: '',
    reason: null,
  }
}

describe('the interim look', () => {
  it('plans the design’s difference at α over the pairs, from the pooled SD', () => {
    // delta 10, sd 12, sig.level 0.05/3: n = 19; power at n = 5: 0.1325568.
    const look = interimLook('brightness', [pair(4, 12, 5), pair(7, 12, 5), pair(-9, 12, 5)], 5, {
      targetDifference: 10,
    })
    expect(look).toMatchObject({
      difference: 10,
      differenceSource: 'design',
      sd: 12,
      pairs: 3,
      needed: 19,
      more: 14,
      reason: null,
    })
    expect(look.alphaPerPair).toBeCloseTo(0.05 / 3, 15)
    expect(look.powerNow).toBeCloseTo(0.1325568, 6)
    expect(look.sentence).toBe(
      'With an SD of 12.0 points so far, 19 complete players would find the 10.0-point difference ' +
        'the design named on brightness with 80% power (α 0.05 over 3 pairs): 14 more than the 5 ' +
        'complete so far.',
    )
  })

  it('falls back to the largest difference seen, and says so', () => {
    // delta 6.5, sd 9.3, sig.level 0.05: n = 19; power at n = 5: 0.2266129.
    const look = interimLook('warmth', [pair(-6.5, 9.3, 5)], 5, { targetDifference: null })
    expect(look).toMatchObject({ differenceSource: 'observed', needed: 19, more: 14 })
    expect(look.powerNow).toBeCloseTo(0.2266129, 6)
    expect(look.sentence).toMatch(/a 6\.5-point difference \(the largest seen so far\)/)
  })

  it('pools the SD by degrees of freedom and never advises stopping', () => {
    // Every SD is 9, so the pooled SD is 9; delta 25, sig.level 0.05/6: n = 5, power 0.8055255.
    const pairs = [pair(3, 9, 5), pair(1, 9, 10), ...[1, 2, 3, 4].map(() => pair(2, 9, 5))]
    const look = interimLook('focus', pairs, 5, { targetDifference: 25 })
    expect(look.sd).toBeCloseTo(9, 12)
    expect(look).toMatchObject({ needed: 5, more: 0 })
    expect(look.powerNow).toBeCloseTo(0.8055255, 6)
    expect(look.sentence).not.toMatch(/stop/i)
  })

  it('gives a reason, never a number, when there is nothing to plan from', () => {
    expect(interimLook('a', [pair(0, 0, 1)].slice(1), 0, { targetDifference: 10 }).reason).toBe(
      'fewer than two players rated every recipe',
    )
    expect(interimLook('a', [pair(0, 5, 4)], 4, { targetDifference: null })).toMatchObject({
      reason: 'no difference to detect',
      needed: null,
    })
    expect(interimLook('a', [pair(3, 0, 4)], 4, { targetDifference: 10 })).toMatchObject({
      reason: 'no variance',
      needed: null,
    })
  })
})
