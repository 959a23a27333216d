import { describe, expect, it } from 'vitest'
import { benjaminiHochberg } from '../../../server/analysis/index.ts'
import fixture from './fixtures/benjaminiHochberg.json'

// Against R 4.2.2's p.adjust(p, method = "BH"), made by fixtures/benjaminiHochberg.R beside the
// JSON: ties, unsorted input, NA left out of the family, one p, and Benjamini & Hochberg's
// (1995) 15-test example.

describe('Benjamini–Hochberg', () => {
  it('matches p.adjust(method = "BH") to 1e-15', () => {
    for (const c of fixture as { p: (number | null)[]; bh: (number | null)[] }[]) {
      const ours = benjaminiHochberg(c.p)
      ours.forEach((v, i) => {
        const theirs = c.bh[i]
        if (theirs === null) expect(v).toBeNull()
        else expect(Math.abs((v as number) - theirs)).toBeLessThan(1e-15)
      })
    }
  })

  it('calls the first four of the 15-test example discoveries at 0.05, as the paper does', () => {
    // Benjamini & Hochberg (1995): at q = 0.05 the step-up rule rejects the four smallest
    // (from memory of the paper's example, where Bonferroni-type procedures reject three).
    const p = (fixture as { p: number[] }[])[5].p
    expect(benjaminiHochberg(p).filter((v) => (v as number) <= 0.05)).toHaveLength(4)
  })
})
