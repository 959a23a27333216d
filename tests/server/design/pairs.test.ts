import { describe, expect, it } from 'vitest'
import {
  DesignError,
  leadsInBase,
  pairTrials,
  type PairTrial,
} from '../../../server/design/index.ts'

// ISO 5495 (paired comparison test): the two orders AB and BA are presented equally often,
// because the first sample of a pair is preferred more often than chance (from memory; the
// same rule is restated in most sensory method texts).

const recipeNames = ['r1', 'r2', 'r3', 'r4', 'r5', 'r6', 'r7']
const firstShowings = <T>(trials: PairTrial<T>[]) => trials.filter((t) => t.repeatOf === null)

function leadBalance(trials: PairTrial<string>[]): Map<string, number> {
  // +1 each time a recipe is A, −1 each time it is B.
  const balance = new Map<string, number>()
  for (const t of trials) {
    balance.set(t.a, (balance.get(t.a) ?? 0) + 1)
    balance.set(t.b, (balance.get(t.b) ?? 0) - 1)
  }
  return balance
}

describe('base orientation', () => {
  it.each([2, 3, 4, 5, 6, 7, 8, 9])(
    'lets every item lead as often as it follows, or within one (%i items)',
    (m) => {
      for (let i = 0; i < m; i++) {
        let leads = 0
        for (let j = 0; j < m; j++) {
          if (i === j) continue
          expect(leadsInBase(i, j, m)).toBe(!leadsInBase(j, i, m))
          if (leadsInBase(i, j, m)) leads++
        }
        const follows = m - 1 - leads
        if (m % 2 === 1) expect(leads).toBe(follows)
        else expect(Math.abs(leads - follows)).toBe(1)
      }
    },
  )
})

describe('pairTrials', () => {
  const cases = [2, 3, 4, 5, 6, 7].flatMap((m) => [1, 2, 3].map((sets) => ({ m, sets })))

  it.each(cases)(
    'shows every pair of every set once per player ($m recipes, $sets sets)',
    ({ m, sets }) => {
      const recipes = recipeNames.slice(0, m)
      for (let p = 0; p < 3; p++) {
        const trials = pairTrials(recipes, { playerIndex: p, seed: 'cover', sets })
        expect(trials).toHaveLength((sets * m * (m - 1)) / 2)
        const keys = trials.map((t) => `${t.set}:${[t.a, t.b].sort().join('|')}`)
        expect(new Set(keys).size).toBe(trials.length)
        for (const t of trials) expect(t.a).not.toBe(t.b)
      }
    },
  )

  it.each(cases)(
    'balances A and B per player, within one only for even recipes × odd sets ($m recipes, $sets sets)',
    ({ m, sets }) => {
      const recipes = recipeNames.slice(0, m)
      for (let p = 0; p < 4; p++) {
        const balance = leadBalance(pairTrials(recipes, { playerIndex: p, seed: 'within', sets }))
        const exact = m % 2 === 1 || sets % 2 === 0
        for (const value of balance.values()) {
          expect(Math.abs(value)).toBeLessThanOrEqual(exact ? 0 : 1)
        }
      }
    },
  )

  it.each(cases)(
    'shows each pair AB to half the players and BA to the other half ($m recipes, $sets sets)',
    ({ m, sets }) => {
      const recipes = recipeNames.slice(0, m)
      const orders = new Map<string, number>()
      const all: PairTrial<string>[] = []
      for (let p = 0; p < 6; p++) {
        for (const t of pairTrials(recipes, { playerIndex: p, seed: 'across', sets })) {
          orders.set(`${t.set}:${t.a}>${t.b}`, (orders.get(`${t.set}:${t.a}>${t.b}`) ?? 0) + 1)
          all.push(t)
        }
      }
      expect(orders.size).toBe(sets * m * (m - 1))
      for (const count of orders.values()) expect(count).toBe(3)
      for (const value of leadBalance(all).values()) expect(value).toBe(0)
    },
  )

  it('stays within one across an odd number of players', () => {
    const all = [0, 1, 2].flatMap((p) =>
      pairTrials(recipeNames.slice(0, 4), { playerIndex: p, seed: 'odd-panel' }),
    )
    for (const value of leadBalance(all).values()) expect(Math.abs(value)).toBeLessThanOrEqual(1)
  })

  it('shuffles the trial order by player and seed, reproducibly', () => {
    const recipes = recipeNames.slice(0, 5)
    const plan = (playerIndex: number, seed: string) =>
      pairTrials(recipes, { playerIndex, seed, sets: 2 })
    expect(plan(3, 'seed-a')).toEqual(plan(3, 'seed-a'))
    expect(plan(3, 'seed-a')).not.toEqual(plan(3, 'seed-b'))
    const key = (t: PairTrial<string>) => `${t.set}:${t.a}>${t.b}`
    // Players 1 and 3 share an orientation; only the order of their trials may tell them apart.
    expect(plan(1, 'seed-a').map(key)).not.toEqual(plan(3, 'seed-a').map(key))
    expect([...plan(1, 'seed-a').map(key)].sort()).toEqual([...plan(3, 'seed-a').map(key)].sort())
  })

  it('repeats hidden duplicates later with A and B swapped, never straight after', () => {
    const recipes = recipeNames.slice(0, 4)
    for (let p = 0; p < 8; p++) {
      const trials = pairTrials(recipes, { playerIndex: p, seed: 'dups', sets: 2, duplicates: 4 })
      expect(trials).toHaveLength(12 + 4)
      const repeats = trials.filter((t) => t.repeatOf !== null)
      expect(repeats).toHaveLength(4)
      expect(new Set(repeats.map((t) => t.repeatOf)).size).toBe(4)
      trials.forEach((t, i) => {
        if (t.repeatOf === null) return
        const original = trials[t.repeatOf]
        expect(original.repeatOf).toBeNull()
        expect(t.repeatOf).toBeLessThan(i - 1)
        expect({ set: t.set, a: t.a, b: t.b }).toEqual({
          set: original.set,
          a: original.b,
          b: original.a,
        })
      })
      // The first showings keep the balance checked above.
      expect(firstShowings(trials)).toHaveLength(12)
      for (const value of leadBalance(firstShowings(trials)).values()) expect(value).toBe(0)
    }
  })

  it('refuses designs it cannot balance', () => {
    expect(() => pairTrials(['only'], { playerIndex: 0, seed: 's' })).toThrow(DesignError)
    expect(() => pairTrials(['x', 'y'], { playerIndex: 0, seed: 's', duplicates: 2 })).toThrow(
      /only 1/,
    )
    expect(() => pairTrials(['x', 'y'], { playerIndex: -1, seed: 's' })).toThrow(/player index/)
  })
})
