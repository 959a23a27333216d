import { describe, expect, it } from 'vitest'
import {
  DesignError,
  williamsOrder,
  williamsOrders,
  williamsRowCount,
  williamsSquare,
} from '../../../server/design/index.ts'

// Williams, E. J. (1949). Experimental designs balanced for the estimation of residual effects
// of treatments. Australian Journal of Scientific Research, Series A, 2, 149–168 (volume and
// pages from memory). The properties: in each square every treatment once per position; every
// ordered pair of different treatments adjacent once (even n) or twice over the two mirrored
// squares (odd n).

function positionCounts<T>(rows: T[][]): Map<string, number> {
  const counts = new Map<string, number>()
  for (const row of rows) {
    row.forEach((item, position) => {
      const key = `${position}:${String(item)}`
      counts.set(key, (counts.get(key) ?? 0) + 1)
    })
  }
  return counts
}

function carryOverCounts<T>(rows: T[][]): Map<string, number> {
  const counts = new Map<string, number>()
  for (const row of rows) {
    for (let j = 1; j < row.length; j++) {
      const key = `${String(row[j - 1])}>${String(row[j])}`
      counts.set(key, (counts.get(key) ?? 0) + 1)
    }
  }
  return counts
}

const sizes = [2, 3, 4, 5, 6, 7, 8, 9, 10]

describe('williamsSquare', () => {
  it.each(sizes)('has n rows for even n and 2n for odd n (n = %i)', (n) => {
    expect(williamsSquare(n)).toHaveLength(n % 2 === 0 ? n : 2 * n)
    expect(williamsRowCount(n)).toBe(williamsSquare(n).length)
  })

  it.each(sizes)('puts every treatment once in each position of each square (n = %i)', (n) => {
    const rows = williamsSquare(n)
    for (const row of rows) expect([...row].sort((a, b) => a - b)).toEqual([...Array(n).keys()])
    // Each n-row half is a Latin square on its own, so odd designs are checked per half.
    for (let start = 0; start < rows.length; start += n) {
      const counts = positionCounts(rows.slice(start, start + n))
      expect(counts.size).toBe(n * n)
      for (const count of counts.values()) expect(count).toBe(1)
    }
  })

  it.each(sizes)('follows every treatment by every other equally often (n = %i)', (n) => {
    const counts = carryOverCounts(williamsSquare(n))
    const expected = n % 2 === 0 ? 1 : 2
    for (let a = 0; a < n; a++) {
      for (let b = 0; b < n; b++) {
        expect(counts.get(`${a}>${b}`) ?? 0).toBe(a === b ? 0 : expected)
      }
    }
  })

  it('refuses a size that is not a whole number of treatments', () => {
    expect(() => williamsSquare(0)).toThrow(DesignError)
    expect(() => williamsSquare(2.5)).toThrow(/whole number/)
    expect(williamsSquare(1)).toEqual([[0]])
  })
})

describe('williamsOrders', () => {
  const recipes = ['core-steel', 'core-synthetic', 'core-gut', 'damped-v2', 'flat-wound']

  it.each([3, 4, 5, 6])(
    'keeps position and carry-over balance on real labels over complete blocks (%i items)',
    (n) => {
      const items = recipes.concat(['extra']).slice(0, n)
      const rows = williamsRowCount(n)
      const orders = williamsOrders(items, 2 * rows, 'session-balance')
      const positions = positionCounts(orders)
      for (const count of positions.values()) expect(count).toBe(2 * (rows / n))
      const carry = carryOverCounts(orders)
      expect(carry.size).toBe(n * (n - 1))
      for (const count of carry.values()) expect(count).toBe(2 * (n % 2 === 0 ? 1 : 2))
    },
  )

  it('keeps position balance for the first n players of an odd design', () => {
    const orders = williamsOrders(recipes, 5, 'half-block')
    for (const count of positionCounts(orders).values()) expect(count).toBe(1)
  })

  it('deals row i mod rows to player i', () => {
    const orders = williamsOrders(recipes, 25, 'cycle')
    expect(orders[10]).toEqual(orders[0])
    expect(orders[23]).toEqual(orders[3])
    expect(williamsOrder(recipes, 13, 'cycle')).toEqual(orders[13])
  })

  it('gives the same orders for the same seed and other orders for other seeds', () => {
    expect(williamsOrders(recipes, 10, 'seed-a')).toEqual(williamsOrders(recipes, 10, 'seed-a'))
    const firsts = new Set(
      ['seed-a', 'seed-b', 'seed-c', 'seed-d', 'seed-e', 'seed-f'].map(
        (seed) => williamsOrder(recipes, 0, seed)[0],
      ),
    )
    expect(firsts.size).toBeGreaterThan(1)
  })
})
