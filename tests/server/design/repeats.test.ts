import { describe, expect, it } from 'vitest'
import { createRandom, DesignError, placeRepeats } from '../../../server/design/index.ts'

describe('placeRepeats', () => {
  const trials = ['t0', 't1', 't2', 't3', 't4', 't5']

  it('leaves the first showings in their original order', () => {
    for (let seed = 0; seed < 50; seed++) {
      const placed = placeRepeats(trials, 3, createRandom(seed), (t) => `${t}*`)
      expect(placed.filter((p) => p.repeatOf === null).map((p) => p.item)).toEqual(trials)
    }
  })

  it.each([1, 2, 3, 4, 5])(
    'puts each of %i repeats after its original with at least one trial between',
    (count) => {
      for (let seed = 0; seed < 200; seed++) {
        const placed = placeRepeats(trials, count, createRandom(seed), (t) => `${t}*`)
        expect(placed).toHaveLength(trials.length + count)
        const repeats = placed.filter((p) => p.repeatOf !== null)
        expect(new Set(repeats.map((p) => p.repeatOf)).size).toBe(count)
        placed.forEach((p, i) => {
          if (p.repeatOf === null) return
          expect(p.repeatOf).toBeLessThan(i - 1)
          expect(p.item).toBe(`${placed[p.repeatOf].item}*`)
        })
      }
    },
  )

  it('refuses more repeats than trials', () => {
    expect(() => placeRepeats(trials, 7, createRandom(1), (t) => t)).toThrow(DesignError)
    expect(() => placeRepeats(trials, -1, createRandom(1), (t) => t)).toThrow(/whole number/)
  })
})
