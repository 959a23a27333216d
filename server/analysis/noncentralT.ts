import betainc from '@stdlib/math-base-special-betainc'
import erfc from '@stdlib/math-base-special-erfc'
import gammainc from '@stdlib/math-base-special-gammainc'

/*
 * The noncentral t distribution: T = (Z + δ) / √(V/ν), Z standard normal, V chi-squared(ν).
 *
 * For t ≥ 0, with x = t²/(t² + ν), y = ν/(t² + ν) and μ = δ²/2, the lower tail is the
 * Poisson-weighted mixture of incomplete beta functions (written from memory, and checked
 * against independent reference values in the tests):
 *
 *   P(T ≤ t) = Φ(−δ) + ½ Σ_j [ p_j · I_x(j + ½, ν/2) + q_j · I_x(j + 1, ν/2) ],
 *   p_j = e^{−μ} μ^j / j!,   q_j = δ e^{−μ} μ^j / (√2 · Γ(j + 3/2)).
 *
 * Since ½ Σ p_j + ½ Σ q_j = Φ(δ) − Φ(−δ) + ½ … = 1 − Φ(−δ), the upper tail is the same sum
 * with each I_x replaced by its complement I_y(ν/2, ·). For δ ≥ 0 every term of that sum is
 * positive, so a small upper tail (the power of a test) is summed directly instead of being
 * left as 1 minus a number close to 1. A negative t is reflected: P(T ≤ t; δ) =
 * P(T ≥ −t; −δ). With δ < 0 after reflection the terms alternate in sign and the result is
 * good to about 1e-15 absolute, not relative; that only happens for a tail the planner never
 * asks for (t < 0 with a positive δ).
 *
 * The sum starts at the Poisson mode and runs both ways, so a large δ does not underflow the
 * first weight (e^{−μ} is 0 in double precision beyond δ ≈ 37.6), and stops when a bound on
 * everything left is below 1e-17 of the sum so far.
 */

const MAX_TERMS = 20_000
const STOP = 1e-17
const SQRT_2_OVER_PI = Math.sqrt(2 / Math.PI)

/** P(T ≤ t) (or P(T > t) with `lowerTail` false) for the noncentral t with `df` and `ncp`. */
export function noncentralTCdf(t: number, df: number, ncp: number, lowerTail = true): number {
  if (Number.isNaN(t) || Number.isNaN(ncp) || !(df > 0) || !Number.isFinite(ncp)) return NaN
  if (t === Infinity) return lowerTail ? 1 : 0
  if (t === -Infinity) return lowerTail ? 0 : 1
  const negate = t < 0
  const tt = negate ? -t : t
  const delta = negate ? -ncp : ncp
  // Reflection swaps the tails.
  const wantLower = lowerTail !== negate
  const p = wantLower ? reflectedLower(tt, df, delta) : reflectedUpper(tt, df, delta)
  return Math.min(1, Math.max(0, p))
}

/** Φ(−d), accurate far into either tail. */
function normalBelowMinus(d: number): number {
  return 0.5 * erfc(d / Math.SQRT2)
}

function reflectedLower(t: number, df: number, delta: number): number {
  if (t === 0) return normalBelowMinus(delta)
  const x = (t * t) / (t * t + df)
  if (delta === 0) return 0.5 + 0.5 * betainc(x, 0.5, df / 2)
  const b = df / 2
  // I_x(a, b) falls as a grows, so the term just added bounds every later one.
  return (
    normalBelowMinus(delta) +
    0.5 * mixture(delta, normalBelowMinus(delta), (a) => betainc(x, a, b), 'falls')
  )
}

/**
 * A bound on P(T ≤ t) for t > 0, δ > 0: T ≤ t needs Z ≤ −δ/2 or t·√(V/ν) ≥ δ/2 (otherwise
 * Z + δ > δ/2 > t·√(V/ν)), so P(T ≤ t) ≤ Φ(−δ/2) + P(V ≥ ν·(δ/2t)²).
 */
function lowerTailBound(t: number, df: number, delta: number): number {
  const v = df * (delta / (2 * t)) ** 2
  return normalBelowMinus(delta / 2) + gammainc(v / 2, df / 2, true, true)
}

function reflectedUpper(t: number, df: number, delta: number): number {
  if (t === 0) return normalBelowMinus(-delta)
  // A power so close to 1 that 1 − power is below the last bit of a double is 1; the series
  // would need millions of terms to say so when √n·d/s runs into the hundreds.
  if (delta > 0 && lowerTailBound(t, df, delta) < 1e-17) return 1
  // y computed directly, not as 1 − x, keeps its digits when t is large.
  const y = df / (t * t + df)
  const b = df / 2
  if (delta === 0) return 0.5 * betainc(y, b, 0.5)
  return 0.5 * mixture(delta, 0, (a) => betainc(y, b, a), 'rises')
}

/**
 * Σ_j [p_j · f(j + ½) + q_j · f(j + 1)] from the Poisson mode outwards. `shape` says whether
 * f falls or rises with its argument; with f ≤ 1 that gives a bound on the terms not yet added.
 * `offset` is what the caller adds to the sum, so the stopping rule is relative to the result.
 */
function mixture(
  delta: number,
  offset: number,
  f: (a: number) => number,
  shape: 'falls' | 'rises',
): number {
  const mu = (delta * delta) / 2
  const mode = Math.floor(mu)
  // log of the Poisson weight and of the odd weight at the mode, by summing logs of the
  // ratios: no log-gamma needed and no underflow of e^{−μ} on the way.
  let logP = -mu
  let logQ = -mu + Math.log(Math.abs(delta) * SQRT_2_OVER_PI)
  for (let k = 1; k <= mode; k++) {
    logP += Math.log(mu / k)
    logQ += Math.log(mu / (k + 0.5))
  }
  const sign = delta < 0 ? -1 : 1
  const pMode = Math.exp(logP)
  const qMode = Math.exp(logQ)

  let sum = 0
  let size = Math.abs(offset)
  // Forward from the mode: weights shrink by at least μ/(j + 1) < 1 per step.
  let p = pMode
  let q = qMode
  for (let j = mode; j < mode + MAX_TERMS; j++) {
    const fp = f(j + 0.5)
    const fq = f(j + 1)
    const term = p * fp + sign * q * fq
    sum += term
    size += Math.abs(term)
    const r = mu / (j + 1)
    const largestLeft = shape === 'falls' ? fp : 1
    if (((p + q) * largestLeft * r) / (1 - r) <= STOP * size) break
    p *= mu / (j + 1)
    q *= mu / (j + 1.5)
  }
  // Backward from the mode: below the mode each step down shrinks the weights by at least
  // (j + ½)/μ, which is below 1 once j + ½ < μ.
  p = pMode
  q = qMode
  for (let j = mode - 1; j >= 0; j--) {
    p *= (j + 1) / mu
    q *= (j + 1.5) / mu
    const fp = f(j + 0.5)
    const fq = f(j + 1)
    const term = p * fp + sign * q * fq
    sum += term
    size += Math.abs(term)
    const r = (j + 0.5) / mu
    if (r < 1) {
      const largestLeft = shape === 'rises' ? fq : 1
      if (((p + q) * largestLeft * r) / (1 - r) <= STOP * size) break
    }
  }
  return sum
}
