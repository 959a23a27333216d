import { describe, expect, it } from 'vitest'
import { createRandom, deriveSeed, hashSeed, shuffle } from '../../../server/design/index.ts'

const draws = (seed: string | number, n = 20) => {
  const random = createRandom(seed)
  return Array.from({ length: n }, () => random.next())
}

describe('seeded randomness', () => {
  it('repeats the same draws for the same seed', () => {
    expect(draws('session-7f3a')).toEqual(draws('session-7f3a'))
    expect(draws(42)).toEqual(draws(42))
  })

  it('gives unrelated draws for seeds that differ in one character', () => {
    const a = draws('session-1')
    const b = draws('session-2')
    expect(a.filter((x, i) => x === b[i])).toHaveLength(0)
    expect(hashSeed('session-1')).not.toBe(hashSeed('session-2'))
  })

  it('draws in [0, 1) and integers in [0, n)', () => {
    const random = createRandom('range')
    for (let i = 0; i < 10_000; i++) {
      const x = random.next()
      expect(x >= 0 && x < 1).toBe(true)
      const k = random.int(7)
      expect(Number.isInteger(k) && k >= 0 && k < 7).toBe(true)
    }
  })

  it('keeps derived streams apart from each other and from the parent', () => {
    expect(draws(deriveSeed('s', 'codes'))).not.toEqual(draws(deriveSeed('s', 'pairs')))
    expect(draws(deriveSeed('s', 'codes'))).not.toEqual(draws('s'))
  })
})

describe('shuffle', () => {
  it('returns a permutation and leaves the input alone', () => {
    const items = ['w', 'x', 'y', 'z', 'v']
    const out = shuffle(items, createRandom('perm'))
    expect([...out].sort()).toEqual([...items].sort())
    expect(items).toEqual(['w', 'x', 'y', 'z', 'v'])
  })

  it('deals every ordering of three items about equally often', () => {
    // 6,000 shuffles: each of the 6 orderings expects 1,000 (binomial SD about 29); a band of
    // ±150 only fails for a biased shuffle such as swapping with any index instead of j ≤ i.
    const random = createRandom('uniformity')
    const counts = new Map<string, number>()
    for (let i = 0; i < 6000; i++) {
      const key = shuffle([0, 1, 2], random).join('')
      counts.set(key, (counts.get(key) ?? 0) + 1)
    }
    expect(counts.size).toBe(6)
    for (const count of counts.values()) expect(Math.abs(count - 1000)).toBeLessThan(150)
  })
})
