import { describe, expect, it } from 'vitest'
import {
  pairedTSampleSize,
  signTestSampleSize,
  triangleSampleSize,
} from '../../../server/analysis/index.ts'
import {
  playersForDifference,
  playersForPreference,
  playersForTriangle,
  roundUpToBlock,
  triangleCriterion,
} from '../../../server/design/index.ts'
import { balancedBlock } from '../../../server/formats/index.ts'

describe('session planner figures', () => {
  it('plans 10 players for a difference of one SD (paired t, alpha 0.05, power 0.8)', () => {
    // R power.t.test(delta = 1, sd = 1, power = 0.8, type = "paired"): n = 9.94, so 10
    // (from memory; the statistics engine's own tests re-check it).
    const plan = playersForDifference({ difference: 8, sd: 8 })
    expect(plan.n).toBe(10)
    expect(plan).toEqual(pairedTSampleSize({ difference: 8, sd: 8 }))
  })

  it('passes alpha and power through to the engine', () => {
    const input = { difference: 5, sd: 12, alpha: 0.01, power: 0.9 }
    expect(playersForDifference(input)).toEqual(pairedTSampleSize(input))
    expect(playersForDifference(input).n).toBeGreaterThan(
      playersForDifference({ difference: 5, sd: 12 }).n as number,
    )
  })

  it('needs fewer players for a stronger expected preference (sign test)', () => {
    const weak = playersForPreference({ share: 0.65 })
    const strong = playersForPreference({ share: 0.8 })
    expect(weak).toEqual(signTestSampleSize({ share: 0.65 }))
    expect(strong.n as number).toBeLessThan(weak.n as number)
    expect(strong.power as number).toBeGreaterThanOrEqual(0.8)
  })

  it('plans triangle answers through the engine', () => {
    expect(playersForTriangle({ pd: 0.3 })).toEqual(triangleSampleSize({ pd: 0.3 }))
    expect(playersForTriangle({ pd: 0 }).n).toBeNull()
  })

  it.each([
    { n: 6, at05: 5, at01: 6 },
    { n: 12, at05: 8, at01: 9 },
    { n: 24, at05: 13, at01: 15 },
    { n: 36, at05: 18, at01: 20 },
  ])('shows the ISO 4120 minimum correct for $n players', ({ n, at05, at01 }) => {
    // ISO 4120 table of minimum correct answers (also the FAO sensory manual table).
    expect(triangleCriterion(n)).toBe(at05)
    expect(triangleCriterion(n, 0.01)).toBe(at01)
  })

  it('rounds a panel up to whole balanced blocks of the order design', () => {
    expect(balancedBlock('rating', 4)).toBe(4)
    expect(balancedBlock('rating', 5)).toBe(10)
    expect(balancedBlock('playtest', 3)).toBe(6)
    expect(balancedBlock('pair', 6)).toBe(2)
    expect(balancedBlock('triangle', 2)).toBe(12)
    expect(roundUpToBlock(10, balancedBlock('rating', 4))).toBe(12)
    expect(roundUpToBlock(12, 12)).toBe(12)
  })
})
