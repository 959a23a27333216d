import { describe, expect, it } from 'vitest'
import {
  repeatOrder,
  TRIANGLE_BLOCK,
  TRIANGLE_ORDERS,
  triangleDeal,
  triangleOrderSequence,
  triangleTrials,
  type TriangleTrial,
} from '../../../server/design/index.ts'

// ISO 4120 (triangle test): the six possible orders ABB, BAB, BBA, AAB, ABA, BAA are used
// equally often, dealt in blocks of six across assessors, each sample under a random
// three-digit code (from memory of the standard; the orders are restated in REFERENCES.md).

const pair = ['steel-core', 'gut-core'] as const

function isWellFormed(t: { samples: string[]; odd: number }): boolean {
  const others = t.samples.filter((_, i) => i !== t.odd)
  return others[0] === others[1] && t.samples[t.odd] !== others[0]
}

describe('triangle orders', () => {
  it('are the six arrangements of one odd sample among three', () => {
    expect([...TRIANGLE_ORDERS].sort()).toEqual(['AAB', 'ABA', 'ABB', 'BAA', 'BAB', 'BBA'])
    for (const order of TRIANGLE_ORDERS) expect(new Set(order).size).toBe(2)
  })

  it('are dealt in a seeded sequence that differs between sessions', () => {
    expect(triangleOrderSequence('s1')).toEqual(triangleOrderSequence('s1'))
    expect([...triangleOrderSequence('s1')].sort()).toEqual([...TRIANGLE_ORDERS].sort())
    const starts = new Set(
      ['s1', 's2', 's3', 's4', 's5', 's6'].map((s) => triangleOrderSequence(s).join()),
    )
    expect(starts.size).toBeGreaterThan(1)
  })

  it('give any six consecutive players the six orders once each', () => {
    const sequence = triangleOrderSequence('blocks')
    for (const key of [0, 1, 4]) {
      for (let start = 0; start < 24; start++) {
        const block = Array.from({ length: 6 }, (_, k) =>
          triangleDeal(pair, start + k, key, sequence),
        )
        expect(new Set(block.map((t) => t.order)).size).toBe(6)
        for (const t of block) expect(isWellFormed(t)).toBe(true)
      }
    }
  })

  it('make each recipe the odd sample three times in each block of six players', () => {
    const sequence = triangleOrderSequence('odd-role')
    for (const key of [0, 1, 4]) {
      for (let block = 0; block < 4; block++) {
        const deals = Array.from({ length: 6 }, (_, k) =>
          triangleDeal(pair, 6 * block + k, key, sequence),
        )
        expect(deals.filter((t) => t.samples[t.odd] === 'steel-core')).toHaveLength(3)
      }
    }
  })

  it('give any twelve consecutive players every order with each recipe as "A" once', () => {
    const sequence = triangleOrderSequence('twelve')
    for (const key of [0, 3]) {
      for (let start = 0; start < 24; start++) {
        const seen = new Set<string>()
        for (let k = 0; k < TRIANGLE_BLOCK; k++) {
          const t = triangleDeal(pair, start + k, key, sequence)
          seen.add(`${t.order}:${t.samples[t.order.indexOf('A')]}`)
        }
        expect(seen.size).toBe(12)
      }
    }
  })

  it('mirror for a repeat so the other recipe becomes the odd one', () => {
    expect(repeatOrder('ABB')).toBe('AAB')
    expect(repeatOrder('BAA')).toBe('BBA')
    for (const order of TRIANGLE_ORDERS) expect(repeatOrder(repeatOrder(order))).toBe(order)
  })
})

describe('triangleTrials', () => {
  it('deals the six orders in balanced blocks of six players', () => {
    const trials = Array.from({ length: 24 }, (_, p) =>
      triangleTrials([...pair], { playerIndex: p, seed: 'panel' }),
    )
    for (let block = 0; block < 4; block++) {
      const orders = trials.slice(block * 6, block * 6 + 6).map((list) => list[0].order)
      expect(new Set(orders).size).toBe(6)
    }
    const first = triangleOrderSequence('panel')
    trials.forEach((list, p) => expect(list[0].order).toBe(first[p % 6]))
  })

  it('balances every pair and set across players with several recipes and sets', () => {
    const recipes = ['r1', 'r2', 'r3']
    const plans = Array.from({ length: 12 }, (_, p) =>
      triangleTrials(recipes, { playerIndex: p, seed: 'many', sets: 2 }),
    )
    const byKey = new Map<string, TriangleTrial<string>[]>()
    for (const plan of plans) {
      expect(plan).toHaveLength(6)
      for (const t of plan) {
        expect(isWellFormed(t)).toBe(true)
        const key = `${t.set}:${[...new Set(t.samples)].sort().join('|')}`
        byKey.set(key, [...(byKey.get(key) ?? []), t])
      }
    }
    expect(byKey.size).toBe(6)
    for (const list of byKey.values()) {
      // Players arrive in order, so each key's first six and last six answers are the blocks.
      for (const block of [list.slice(0, 6), list.slice(6)]) {
        expect(new Set(block.map((t) => t.order)).size).toBe(6)
        const oddOnes = block.map((t) => t.samples[t.odd])
        for (const recipe of new Set(oddOnes)) {
          expect(oddOnes.filter((r) => r === recipe)).toHaveLength(3)
        }
      }
      const combos = new Set(list.map((t) => `${t.order}:${t.samples[t.order.indexOf('A')]}`))
      expect(combos.size).toBe(12)
    }
  })

  it('is the same for the same seed and differs for another', () => {
    const plan = (seed: string) =>
      Array.from({ length: 6 }, (_, p) =>
        triangleTrials(['r1', 'r2', 'r3'], { playerIndex: p, seed, sets: 2 }),
      )
    expect(plan('x')).toEqual(plan('x'))
    expect(plan('x')).not.toEqual(plan('y'))
  })

  it('repeats a triangle later with the other recipe odd', () => {
    for (let p = 0; p < 12; p++) {
      const trials = triangleTrials(['r1', 'r2', 'r3'], {
        playerIndex: p,
        seed: 'dups',
        duplicates: 2,
      })
      expect(trials).toHaveLength(5)
      trials.forEach((t, i) => {
        expect(isWellFormed(t)).toBe(true)
        if (t.repeatOf === null) return
        const original = trials[t.repeatOf]
        expect(t.repeatOf).toBeLessThan(i - 1)
        expect(t.order).toBe(repeatOrder(original.order))
        expect(new Set(t.samples)).toEqual(new Set(original.samples))
        expect(t.samples[t.odd]).not.toBe(original.samples[original.odd])
      })
    }
  })

  it('needs two recipes', () => {
    expect(() => triangleTrials(['alone'], { playerIndex: 0, seed: 's' })).toThrow(/two recipes/)
  })
})
