import { describe, expect, it } from 'vitest'
import { compactLetters } from '../../../server/analysis/compactLetters.ts'
import fixture from './fixtures/compactLetters.json'
import { seeded } from './random.ts'

// Against multcompView::multcompLetters (R 4.2.2, fixtures/compactLetters.R beside the JSON).
// R may name the letters differently, so what is compared is what the letters say: which
// pairs share a letter, and how many letters there are.

const share = (x: string, y: string) => [...x].some((c) => y.includes(c))
const letterCount = (letters: Iterable<string>) => new Set([...letters].join('')).size

describe('compact letters', () => {
  it('share a letter exactly where multcompLetters does, with as many letters', () => {
    for (const c of fixture) {
      const ours = compactLetters(c.items, c.pairs)
      const theirs = c.letters as Record<string, string>
      for (const p of c.pairs) {
        expect(share(ours.get(p.a)!, ours.get(p.b)!), `${p.a}-${p.b}`).toBe(!p.different)
        expect(share(theirs[p.a], theirs[p.b])).toBe(!p.different)
      }
      expect(letterCount(ours.values())).toBe(letterCount(Object.values(theirs)))
    }
  })

  it('gives the classic overlap: a, ab, b (computed by hand)', () => {
    const letters = compactLetters(
      ['A', 'B', 'C'],
      [
        { a: 'A', b: 'B', different: false },
        { a: 'A', b: 'C', different: true },
        { a: 'B', b: 'C', different: false },
      ],
    )
    expect([...letters.values()]).toEqual(['a', 'ab', 'b'])
  })

  it('gives the top item "a", and keeps sharing ⇔ not different on random patterns', () => {
    const random = seeded(2026).uniform
    for (let round = 0; round < 200; round++) {
      const k = 2 + Math.floor(random() * 9)
      const items = Array.from({ length: k }, (_, i) => i)
      const pairs = items.flatMap((a) =>
        items.filter((b) => b > a).map((b) => ({ a, b, different: random() < 0.5 })),
      )
      const letters = compactLetters(items, pairs)
      expect(letters.get(0)!.startsWith('a')).toBe(true)
      for (const p of pairs) expect(share(letters.get(p.a)!, letters.get(p.b)!)).toBe(!p.different)
    }
  })
})
