import { describe, expect, it } from 'vitest'
import {
  DUPLICATE_TOLERANCE,
  RELIABILITY_RULE,
  reliability,
  type Rating,
} from '../../../server/analysis/index.ts'
import { seeded } from './random.ts'

// A panel of 8 players, 5 recipes, 2 attributes, each clip heard twice (hidden duplicate).
// True recipe scores are spread out; "steady" players repeat themselves within a few points,
// "erratic" ones answer almost at random.
function panel(erratic: string[]): Rating[] {
  const rng = seeded(5)
  const truth: Record<string, number[]> = {
    brightness: [20, 35, 50, 65, 80],
    warmth: [75, 60, 50, 40, 25],
  }
  const ratings: Rating[] = []
  for (let p = 1; p <= 8; p++) {
    const player = `p${p}`
    for (const attribute of Object.keys(truth)) {
      truth[attribute].forEach((score, r) => {
        for (let repeat = 0; repeat < 2; repeat++) {
          const value = erratic.includes(player)
            ? rng.uniform() * 100
            : Math.min(100, Math.max(0, score + rng.normal(0, 3)))
          ratings.push({ player, recipe: `r${r}`, clip: `c${r}`, attribute, value })
        }
      })
    }
  }
  return ratings
}

describe('reliability', () => {
  it('states its rule, adapted from the ITU-R BS.1534-3 post-screening', () => {
    expect(RELIABILITY_RULE).toContain('15%')
    expect(RELIABILITY_RULE).toContain(`${DUPLICATE_TOLERANCE} points`)
    expect(RELIABILITY_RULE).toContain('BS.1534-3')
  })

  it('flags the erratic player and not the steady ones', () => {
    const result = reliability(panel(['p3']))
    const byPlayer = new Map(result.players.map((p) => [p.player, p]))
    expect(byPlayer.get('p3')?.flagged).toBe(true)
    for (const p of ['p1', 'p2', 'p4', 'p5', 'p6', 'p7', 'p8']) {
      expect(byPlayer.get(p)?.flagged).toBe(false)
      expect(byPlayer.get(p)?.duplicatePairs).toBe(10)
      expect(byPlayer.get(p)?.panelAgreement).toBeGreaterThan(0.8)
      expect(byPlayer.get(p)?.duplicateCorrelation).toBeGreaterThan(0.9)
    }
    expect(byPlayer.get('p3')?.panelAgreement ?? 0).toBeLessThan(0.8)
  })

  it('applies the 15% limit strictly: a miss share of exactly 15% is not flagged', () => {
    // 20 duplicated items, 3 of them differing by more than the tolerance: 15%, not more.
    const ratings: Rating[] = []
    for (let i = 0; i < 20; i++) {
      const first = 50
      const second = i < 3 ? 50 + DUPLICATE_TOLERANCE + 1 : 52
      for (const value of [first, second]) {
        ratings.push({ player: 'p', recipe: `r${i}`, clip: 'c', attribute: 'a', value })
      }
    }
    const [p] = reliability(ratings).players
    expect(p.missShare).toBeCloseTo(0.15, 12)
    expect(p.flagged).toBe(false)
    const stricter = reliability(ratings, { maxMissShare: 0.1 }).players[0]
    expect(stricter.flagged).toBe(true)
  })

  it('does not judge a player with too few duplicates', () => {
    const ratings: Rating[] = [
      { player: 'p', recipe: 'A', attribute: 'a', value: 10 },
      { player: 'p', recipe: 'A', attribute: 'a', value: 90 },
    ]
    const [p] = reliability(ratings).players
    expect(p).toMatchObject({
      duplicatePairs: 1,
      misses: 1,
      flagged: false,
      reason: 'too few hidden duplicates',
    })
    expect(p.panelAgreement).toBeNull()
  })

  it('returns no players for no data', () => {
    expect(reliability([]).players).toEqual([])
  })
})
