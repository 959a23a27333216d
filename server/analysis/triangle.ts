import { binomialUpper, checkCounts, clopperPearson } from './binomial.ts'
import type { Interval, Reason } from './types.ts'

/** Chance of picking the odd one out of three by guessing. */
export const TRIANGLE_GUESS_RATE = 1 / 3

export interface TriangleResult {
  correct: number
  n: number
  /** One-sided exact binomial p against guessing (p0 = 1/3). */
  p: number | null
  /** Fewest correct answers that reach significance at 0.05 and 0.01 for this n. */
  minimumCorrect05: number | null
  minimumCorrect01: number | null
  /** Proportion of discriminators, 1.5·(x/n) − 0.5, floored at 0 as a share cannot be negative. */
  pd: number | null
  /** Clopper–Pearson interval on the share correct, carried through the same transform. */
  pdCi: Interval | null
  reason: Reason
}

/** Smallest x with P(X ≥ x) ≤ alpha under guessing; null when even n of n is not enough. */
export function triangleMinimumCorrect(n: number, alpha = 0.05): number | null {
  if (!(n > 0)) return null
  for (let x = Math.ceil(n / 3); x <= n; x++) {
    if (binomialUpper(x, n, TRIANGLE_GUESS_RATE) <= alpha) return x
  }
  return null
}

/** Proportion of discriminators from a share correct; the model behind the triangle test. */
export function proportionDiscriminators(shareCorrect: number): number {
  return Math.min(1, Math.max(0, 1.5 * shareCorrect - 0.5))
}

export function triangleTest(correct: number, n: number, level = 0.95): TriangleResult {
  checkCounts('triangleTest', correct, n)
  if (n === 0) {
    return {
      correct,
      n,
      p: null,
      minimumCorrect05: null,
      minimumCorrect01: null,
      pd: null,
      pdCi: null,
      reason: 'no answers',
    }
  }
  const ci = clopperPearson(correct, n, level) as Interval
  return {
    correct,
    n,
    p: binomialUpper(correct, n, TRIANGLE_GUESS_RATE),
    minimumCorrect05: triangleMinimumCorrect(n, 0.05),
    minimumCorrect01: triangleMinimumCorrect(n, 0.01),
    pd: proportionDiscriminators(correct / n),
    pdCi: {
      lower: proportionDiscriminators(ci.lower),
      upper: proportionDiscriminators(ci.upper),
    },
    reason: null,
  }
}
