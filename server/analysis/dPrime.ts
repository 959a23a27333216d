import normalCdf from '@stdlib/stats-base-dists-normal-cdf'
import { checkCounts, clopperPearson } from './binomial.ts'
import { formatNumber } from './format.ts'
import { TRIANGLE_GUESS_RATE } from './triangle.ts'
import type { Interval, Reason } from './types.ts'

/*
 * Thurstonian d′ for the triangle test (odd-one-out): how far apart the two recipes sit on the
 * players' sensory scale, in units of the perceptual noise, from the share of correct answers.
 * A share depends on the method (guessing alone gives 1/3 here); d′ does not, so it compares
 * across methods and sessions. The triangle's psychometric function (Ura 1960; Frijters 1979):
 *
 *   pc(d′) = 2 ∫₀^∞ [Φ(−z√3 + d′√(2/3)) + Φ(−z√3 − d′√(2/3))] φ(z) dz,
 *
 * with pc(0) = 1/3, rising to 1.
 */

// Gauss–Legendre on [0, 9]: φ(9) ≈ 1e-18, and the integrand is smooth, so 64 nodes give the
// integral to about 1e-15. Nodes are built once by Newton's method on the Legendre polynomial.
const NODES = 64
const UPPER = 9
const { nodes, weights } = gaussLegendre(NODES, 0, UPPER)

function gaussLegendre(n: number, a: number, b: number) {
  const x = new Float64Array(n)
  const w = new Float64Array(n)
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5))
    let derivative = 0
    for (let step = 0; step < 100; step++) {
      let p0 = 1
      let p1 = 0
      for (let k = 1; k <= n; k++) {
        const p2 = p1
        p1 = p0
        p0 = ((2 * k - 1) * z * p1 - (k - 1) * p2) / k
      }
      derivative = (n * (z * p0 - p1)) / (z * z - 1)
      const next = z - p0 / derivative
      if (Math.abs(next - z) < 1e-16) {
        z = next
        break
      }
      z = next
    }
    const half = (b - a) / 2
    const mid = (b + a) / 2
    x[i] = mid - half * z
    x[n - 1 - i] = mid + half * z
    w[i] = w[n - 1 - i] = (2 * half) / ((1 - z * z) * derivative * derivative)
  }
  return { nodes: x, weights: w }
}

const SQRT3 = Math.sqrt(3)
const SQRT2_3 = Math.sqrt(2 / 3)
const phi = (z: number) => Math.exp((-z * z) / 2) / Math.sqrt(2 * Math.PI)

/** Share correct in a triangle test for a given d′ (d′ ≥ 0). */
export function trianglePc(dPrime: number): number {
  if (!(dPrime >= 0)) throw new RangeError('trianglePc: d′ must be a number ≥ 0')
  const shift = dPrime * SQRT2_3
  let sum = 0
  for (let i = 0; i < NODES; i++) {
    const z = nodes[i]
    sum +=
      weights[i] *
      (normalCdf(-z * SQRT3 + shift, 0, 1) + normalCdf(-z * SQRT3 - shift, 0, 1)) *
      phi(z)
  }
  return Math.min(1, 2 * sum)
}

// Beyond this d′ the share correct is 1 to within 1e-9: a larger d′ says nothing more.
const D_MAX = 12

/** d′ for a share correct: 0 at or below guessing (1/3), null at 1 (it has no upper bound). */
export function triangleDPrimeFromPc(pc: number): number | null {
  if (!(pc >= 0 && pc <= 1)) throw new RangeError('triangleDPrimeFromPc: pc must lie in 0…1')
  if (pc <= TRIANGLE_GUESS_RATE) return 0
  if (pc >= trianglePc(D_MAX)) return null
  // pc rises with d′, so bisection cannot miss; 60 halvings reach double precision.
  let lo = 0
  let hi = D_MAX
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2
    if (trianglePc(mid) < pc) lo = mid
    else hi = mid
  }
  return (lo + hi) / 2
}

export interface TriangleDPrime {
  correct: number
  n: number
  pc: number | null
  /** d′ from the share correct; 0 when no better than guessing. */
  dPrime: number | null
  /**
   * The exact (Clopper–Pearson) interval of the share, carried through the same function; the
   * upper end is null when the share's upper end is 1 (every answer correct): no bound.
   */
  ci: { lower: number; upper: number | null } | null
  sentence: string
  reason: Reason
}

export function triangleDPrime(correct: number, n: number, level = 0.95): TriangleDPrime {
  checkCounts('triangleDPrime', correct, n)
  if (n === 0) {
    return {
      correct,
      n,
      pc: null,
      dPrime: null,
      ci: null,
      sentence: 'No answers yet: no d′.',
      reason: 'no answers',
    }
  }
  const pc = correct / n
  const share = clopperPearson(correct, n, level) as Interval
  const dPrime = triangleDPrimeFromPc(pc)
  const lower = triangleDPrimeFromPc(share.lower) ?? D_MAX
  const upper = triangleDPrimeFromPc(share.upper)
  const result = { correct, n, pc, dPrime, ci: { lower, upper } }
  if (dPrime === null) {
    return {
      ...result,
      sentence:
        `Every player found the odd one out: the recipes sit far apart, d′ at least ` +
        `${formatNumber(lower, 2)} (95% lower bound), with no upper bound from ${n} answers.`,
      reason: 'no finite estimate',
    }
  }
  return { ...result, sentence: dPrimeSentence(dPrime, result.ci), reason: null }
}

/**
 * The size of d′ in plain words. The bands are common practice in sensory discrimination
 * (d′ ≈ 1 is usually taken as a small but real difference, d′ ≥ 2 as one most people notice),
 * not a standard; the interval is always given with them.
 */
export function dPrimeSentence(
  dPrime: number,
  ci: { lower: number; upper: number | null },
): string {
  const size =
    dPrime < 0.5
      ? 'no more than a slight difference, if any'
      : dPrime < 1.5
        ? 'a small but real difference'
        : dPrime < 2.5
          ? 'a clear difference'
          : 'a large difference'
  const upper = ci.upper === null ? 'no upper bound' : formatNumber(ci.upper, 2)
  return `d′ = ${formatNumber(dPrime, 2)} (95% CI ${formatNumber(ci.lower, 2)} to ${upper}): ${size} between the two recipes on the players' own sense of them.`
}
