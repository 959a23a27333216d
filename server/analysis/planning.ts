import normalQuantile from '@stdlib/stats-base-dists-normal-quantile'
import tQuantile from '@stdlib/stats-base-dists-t-quantile'
import { binomialLower, binomialUpper } from './binomial.ts'
import { noncentralTCdf } from './noncentralT.ts'
import { TRIANGLE_GUESS_RATE, triangleMinimumCorrect } from './triangle.ts'
import type { Reason } from './types.ts'

export interface SampleSizePlan {
  /** Players (or answers, for the triangle test) needed; null when it cannot be planned. */
  n: number | null
  /** Power actually reached at n by the method's own power function. */
  power: number | null
  reason: Reason
}

// Planning beyond this is not a panel any more; refuse rather than loop for ever.
const MAX_N = 100_000

const z = (p: number) => normalQuantile(p, 0, 1)

export interface PairedTPlanInput {
  /** Smallest difference worth finding, in rating points. */
  difference: number
  /** Expected SD of a player's difference between the two recipes. */
  sd: number
  alpha?: number
  power?: number
}

/**
 * Players for a two-sided paired t-test: the smallest whole n whose power (pairedTPower)
 * reaches the target. R's power.t.test solves for a fractional n and one takes its ceiling;
 * the power grows with n, so that is the same n.
 */
export function pairedTSampleSize(input: PairedTPlanInput): SampleSizePlan {
  const { difference, sd, alpha = 0.05, power = 0.8 } = input
  const effect = Math.abs(difference) / sd
  if (!(effect > 0) || !Number.isFinite(effect) || !validLevels(alpha, power)) {
    return { n: null, power: null, reason: planFailure(difference === 0, sd === 0) }
  }
  // Start from the normal-theory n with Guenther's correction (+ z²/2), which is within a
  // player or two of the answer, and walk to the smallest n that reaches the power: each step
  // costs a noncentral t, and a linear walk from far below cost hundreds of them.
  const za = z(1 - alpha / 2)
  const guess = ((za + z(power)) / effect) ** 2 + (za * za) / 2
  if (!(guess < MAX_N)) return { n: null, power: null, reason: 'more than 100,000 players needed' }
  let n = Math.max(2, Math.ceil(guess))
  let reached = pairedTPower(n, effect, alpha)
  while (reached < power && n < MAX_N) reached = pairedTPower(++n, effect, alpha)
  if (reached < power) return { n: null, power: null, reason: 'more than 100,000 players needed' }
  // Power grows with n, so the smallest n is found by stepping down while it still suffices.
  while (n > 2) {
    const below = pairedTPower(n - 1, effect, alpha)
    if (below < power) break
    n--
    reached = below
  }
  return { n, power: reached, reason: null }
}

/**
 * Power of the two-sided paired t with n players and effect d/s, as R's
 * power.t.test(type = "paired", strict = FALSE) computes it: the chance that the noncentral t
 * (df n − 1, noncentrality √n·d/s) lies above the critical value (the far tail, below −t, is
 * left out, as R does by default).
 */
export function pairedTPower(n: number, standardizedEffect: number, alpha = 0.05): number {
  const df = n - 1
  return noncentralTCdf(
    tQuantile(1 - alpha / 2, df),
    df,
    Math.abs(standardizedEffect) * Math.sqrt(n),
    false,
  )
}

export interface SignTestPlanInput {
  /** Expected share of players preferring the favoured recipe (not 0.5). */
  share: number
  alpha?: number
  power?: number
}

/** Exact power of the two-sided sign test at n against a true preference share. */
export function signTestPower(n: number, share: number, alpha = 0.05): number {
  // Largest c with 2·P(X ≤ c) ≤ α under p = 0.5; the test rejects at X ≤ c or X ≥ n − c.
  // Binary search: the tail grows with c, and a linear scan is quadratic inside the n search.
  let lo = -1
  let hi = Math.floor((n - 1) / 2)
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2)
    if (2 * binomialLower(mid, n, 0.5) <= alpha) lo = mid
    else hi = mid - 1
  }
  const c = lo
  if (c < 0) return 0
  return binomialLower(c, n, share) + binomialUpper(n - c, n, share)
}

/**
 * Players for the sign test: the smallest n whose exact power reaches the target. Exact power
 * saw-tooths with n, so a slightly larger n can fall short again; the plan reports the power.
 */
export function signTestSampleSize(input: SignTestPlanInput): SampleSizePlan {
  const { share, alpha = 0.05, power = 0.8 } = input
  if (!(share > 0 && share < 1) || share === 0.5 || !validLevels(alpha, power)) {
    return { n: null, power: null, reason: planFailure(share === 0.5, false) }
  }
  const approx =
    ((z(1 - alpha / 2) * 0.5 + z(power) * Math.sqrt(share * (1 - share))) / (share - 0.5)) ** 2
  let n = Math.max(1, Math.floor(approx * 0.7))
  while (n < MAX_N && signTestPower(n, share, alpha) < power) n++
  if (n >= MAX_N) return { n: null, power: null, reason: 'more than 100,000 players needed' }
  return { n, power: signTestPower(n, share, alpha), reason: null }
}

export interface TrianglePlanInput {
  /** Proportion of discriminators worth detecting (0–1). */
  pd: number
  alpha?: number
  power?: number
}

export function trianglePower(n: number, pd: number, alpha = 0.05): number {
  const x = triangleMinimumCorrect(n, alpha)
  if (x === null) return 0
  return binomialUpper(x, n, TRIANGLE_GUESS_RATE + (2 / 3) * pd)
}

/** Answers needed for a triangle test to detect a given pd (one-sided, exact). */
export function triangleSampleSize(input: TrianglePlanInput): SampleSizePlan {
  const { pd, alpha = 0.05, power = 0.8 } = input
  if (!(pd > 0 && pd <= 1) || !validLevels(alpha, power)) {
    return { n: null, power: null, reason: planFailure(pd === 0, false) }
  }
  const p1 = TRIANGLE_GUESS_RATE + (2 / 3) * pd
  const p0 = TRIANGLE_GUESS_RATE
  const approx =
    ((z(1 - alpha) * Math.sqrt(p0 * (1 - p0)) + z(power) * Math.sqrt(p1 * (1 - p1))) / (p1 - p0)) **
    2
  let n = Math.max(1, Math.floor(approx * 0.7))
  while (n < MAX_N && trianglePower(n, pd, alpha) < power) n++
  if (n >= MAX_N) return { n: null, power: null, reason: 'more than 100,000 players needed' }
  return { n, power: trianglePower(n, pd, alpha), reason: null }
}

/** Inputs the planner form cannot send; a library caller that sends them made a mistake. */
function planFailure(nothingToDetect: boolean, noSpread: boolean): Reason {
  if (nothingToDetect) return 'no difference to detect'
  if (noSpread) return 'no variance'
  throw new RangeError('planning: the effect must be finite and α and power between 0 and 1')
}

function validLevels(alpha: number, power: number): boolean {
  return alpha > 0 && alpha < 1 && power > 0 && power < 1
}
