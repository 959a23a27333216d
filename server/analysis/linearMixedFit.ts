/*
 * REML fit of rating ~ recipe + (1 | player) [+ (1 | player:recipe)] without dense n × n
 * matrices. Within a player × recipe cell, the deviations from the cell mean only inform the
 * residual variance σ² (Σ(y − ȳ)² on Σ(m − 1) df); the cell means of player i have covariance
 * D_i + σ²_u·11ᵀ with D_i = diag(σ²_v + σ²/m_ij), inverted and log-determined in closed form by
 * Sherman–Morrison. So each evaluation costs one pass over the cells. The fixed effects are the
 * recipe means themselves (cell-means coding), which is what the estimated means report.
 *
 * Variance parameters follow lme4: θ_u = σ_u/σ, θ_v = σ_v/σ and σ; the deviance is lme4's REML
 * criterion, −2 log restricted likelihood with its constants.
 */

export interface CellData {
  /** Recipes (columns 0…k−1) and, per player, their cells. */
  k: number
  /**
   * Players grouped by pattern (the same cells with the same counts): they share weights, so
   * each evaluation costs one pass over the patterns. A complete panel is a single pattern.
   */
  patterns: CellPattern[]
  players: number
  /** Ratings per recipe (column): the type III contrasts depend on them. */
  recipeCounts: number[]
  /** Most ratings in any one cell. */
  maxCount: number
  /** Most cells any one player has. */
  widest: number
  /** Observations, cells, and Σ(y − ȳ_cell)². */
  n: number
  cells: number
  within: number
  /** Σ log m over the cells: a constant of the criterion. */
  logCounts: number
  /** Some cell holds more than one rating: the player:recipe term is in the model. */
  repeated: boolean
}

export interface CellPattern {
  recipe: Int32Array
  count: Int32Array
  /** Players with this pattern, and over them Σ ȳ per cell, Σ ȳ² per cell and Σ ȳ ȳᵀ. */
  players: number
  sum: Float64Array
  sumSq: Float64Array
  scatter: Float64Array
}

export interface Gls {
  /** Σ log|Ṽ_i| + log|M̃| (with Ṽ = V/σ²), and the GLS pieces. */
  logDet: number
  quad: number
  beta: Float64Array
  /** M̃⁻¹: vcov(β̂) = σ²·M̃⁻¹. */
  inverse: Float64Array[]
  ok: boolean
}

/** GLS at variance ratios ρ_u = σ²_u/σ², ρ_v = σ²_v/σ². */
/** GLS at variance ratios ρ_u = σ²_u/σ², ρ_v = σ²_v/σ². */
export function gls(data: CellData, rhoU: number, rhoV: number): Gls {
  const { k } = data
  // Flat k × k accumulator and one weight buffer: this runs a hundred times per attribute.
  const M = new Float64Array(k * k)
  const b = new Float64Array(k)
  const w = scratch(data.widest)
  // A cell's weight depends only on its count: logs and reciprocals once per count, not per cell.
  const weightOf = new Float64Array(data.maxCount + 1)
  const logOf = new Float64Array(data.maxCount + 1)
  for (let m = 1; m <= data.maxCount; m++) {
    const d = rhoV + 1 / m
    weightOf[m] = 1 / d
    logOf[m] = Math.log(d)
  }
  let logDet = 0
  let zVz = 0
  for (const p of data.patterns) {
    const c = p.recipe.length
    const { recipe, count, sum, sumSq, scatter } = p
    const n = p.players
    let S = 0
    let wSum = 0
    let logs = 0
    for (let j = 0; j < c; j++) {
      const wj = weightOf[count[j]]
      w[j] = wj
      logs += logOf[count[j]]
      S += wj
      wSum += wj * sum[j]
    }
    const g = 1 + rhoU * S
    logDet += n * (logs + Math.log(g))
    const f = rhoU / g
    let wScatterW = 0
    for (let j = 0; j < c; j++) {
      const rj = recipe[j]
      const wj = w[j]
      const row = rj * k
      zVz += wj * sumSq[j]
      b[rj] += wj * sum[j] - f * wj * wSum
      M[row + rj] += n * wj
      const fw = n * f * wj
      let inner = 0
      for (let l = 0; l < c; l++) {
        M[row + recipe[l]] -= fw * w[l]
        inner += scatter[j * c + l] * w[l]
      }
      wScatterW += wj * inner
    }
    zVz -= f * wScatterW
  }
  const rows = Array.from({ length: k }, (_, i) => M.subarray(i * k, (i + 1) * k))
  const inv = invertSpd(rows)
  if (!inv) return { logDet: NaN, quad: NaN, beta: b, inverse: [], ok: false }
  const beta = new Float64Array(k)
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) beta[i] += inv.inverse[i][j] * b[j]
  let bBeta = 0
  for (let i = 0; i < k; i++) bBeta += b[i] * beta[i]
  return { logDet: logDet + inv.logDet, quad: zVz - bBeta, beta, inverse: inv.inverse, ok: true }
}

let buffer = new Float64Array(16)
function scratch(size: number): Float64Array {
  if (buffer.length < size) buffer = new Float64Array(size)
  return buffer
}

const LOG_2PI = Math.log(2 * Math.PI)

/** lme4's REML criterion with σ² profiled out, at ratios (ρ_u, ρ_v). */
export function profiledDeviance(data: CellData, rhoU: number, rhoV: number): number {
  const fit = gls(data, rhoU, rhoV)
  if (!fit.ok) return Infinity
  const dfResid = data.n - data.k
  const sigma2 = (data.within + fit.quad) / dfResid
  return dfResid * (1 + LOG_2PI + Math.log(sigma2)) + fit.logDet + data.logCounts
}

/** lme4's REML criterion at θ_u, θ_v, σ (not profiled): what Satterthwaite's df derive from. */
export function deviance(data: CellData, thetaU: number, thetaV: number, sigma: number): number {
  const s2 = sigma * sigma
  const fit = gls(data, thetaU * thetaU, thetaV * thetaV)
  if (!fit.ok) return Infinity
  return (
    fit.logDet +
    data.logCounts +
    (data.n - data.k) * (Math.log(s2) + LOG_2PI) +
    (data.within + fit.quad) / s2
  )
}

/** σ² at ratios (ρ_u, ρ_v): the profiled residual variance. */
export function sigma2At(data: CellData, rhoU: number, rhoV: number): number {
  const fit = gls(data, rhoU, rhoV)
  return (data.within + fit.quad) / (data.n - data.k)
}

/** Cholesky inverse and log-determinant of a symmetric positive definite matrix. */
export function invertSpd(a: Float64Array[]): { inverse: Float64Array[]; logDet: number } | null {
  const n = a.length
  const L = Array.from({ length: n }, () => new Float64Array(n))
  let logDet = 0
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = a[i][j]
      for (let q = 0; q < j; q++) sum -= L[i][q] * L[j][q]
      if (i === j) {
        if (!(sum > 0)) return null
        L[i][i] = Math.sqrt(sum)
        logDet += 2 * Math.log(L[i][i])
      } else L[i][j] = sum / L[j][j]
    }
  }
  // Inverse of L, then (L Lᵀ)⁻¹ = L⁻ᵀ L⁻¹.
  const Li = Array.from({ length: n }, () => new Float64Array(n))
  for (let i = 0; i < n; i++) {
    Li[i][i] = 1 / L[i][i]
    for (let j = 0; j < i; j++) {
      let sum = 0
      for (let q = j; q < i; q++) sum -= L[i][q] * Li[q][j]
      Li[i][j] = sum / L[i][i]
    }
  }
  const inverse = Array.from({ length: n }, () => new Float64Array(n))
  for (let i = 0; i < n; i++)
    for (let j = 0; j <= i; j++) {
      let sum = 0
      for (let q = i; q < n; q++) sum += Li[q][i] * Li[q][j]
      inverse[i][j] = inverse[j][i] = sum
    }
  return { inverse, logDet }
}

/**
 * Minimises f over the half-line t ≥ 0 in each coordinate (f even in each t: ρ = t²) by
 * Nelder–Mead, then polishes with Newton steps. Returns the minimiser.
 */
export function minimise(f: (t: number[]) => number, start: number[]): number[] {
  const dim = start.length
  // A point where the criterion cannot be evaluated counts as the worst possible.
  const at = (t: number[]) => {
    const value = f(t.map(Math.abs))
    return Number.isNaN(value) ? Infinity : value
  }
  let simplex = [start, ...start.map((_, i) => start.map((v, j) => (i === j ? v + 0.3 : v)))]
  let values = simplex.map(at)
  for (let iter = 0; iter < 400; iter++) {
    const order = values.map((_, i) => i).sort((a, b) => values[a] - values[b])
    simplex = order.map((i) => simplex[i])
    values = order.map((i) => values[i])
    // Newton finishes the job from close by; the simplex only has to find the basin.
    if (Math.abs(values[dim] - values[0]) < 1e-8 * (1 + Math.abs(values[0]))) break
    const centroid = start.map((_, j) => simplex.slice(0, dim).reduce((s, p) => s + p[j], 0) / dim)
    const toward = (c: number) => centroid.map((v, j) => v + c * (simplex[dim][j] - v))
    const reflected = toward(-1)
    const fr = at(reflected)
    if (fr < values[0]) {
      const expanded = toward(-2)
      const fe = at(expanded)
      if (fe < fr) [simplex[dim], values[dim]] = [expanded, fe]
      else [simplex[dim], values[dim]] = [reflected, fr]
    } else if (fr < values[dim - 1]) {
      ;[simplex[dim], values[dim]] = [reflected, fr]
    } else {
      const contracted = toward(fr < values[dim] ? -0.5 : 0.5)
      const fc = at(contracted)
      if (fc < Math.min(fr, values[dim])) [simplex[dim], values[dim]] = [contracted, fc]
      else
        for (let i = 1; i <= dim; i++) {
          simplex[i] = simplex[i].map((v, j) => simplex[0][j] + 0.5 * (v - simplex[0][j]))
          values[i] = at(simplex[i])
        }
    }
  }
  let lowest = 0
  for (let i = 1; i < values.length; i++) if (values[i] < values[lowest]) lowest = i
  let best = simplex[lowest].map(Math.abs)
  // Newton polish on the gradient, from central differences.
  for (let step = 0; step < 20; step++) {
    const h = 1e-5
    const f0 = at(best)
    const grad = best.map((_, i) => {
      const up = best.map((v, j) => (j === i ? v + h : v))
      const down = best.map((v, j) => (j === i ? v - h : v))
      return (at(up) - at(down)) / (2 * h)
    })
    const hess = best.map((_, i) =>
      best.map((_, j) => {
        const shift = (si: number, sj: number) =>
          best.map((v, q) => v + (q === i ? si * h : 0) + (q === j ? sj * h : 0))
        return (
          (at(shift(1, 1)) - at(shift(1, -1)) - at(shift(-1, 1)) + at(shift(-1, -1))) / (4 * h * h)
        )
      }),
    )
    const delta = solve(hess, grad)
    if (!delta) break
    const next = best.map((v, i) => v - delta[i])
    if (!(at(next) <= f0)) break
    const moved = Math.max(...delta.map(Math.abs))
    best = next.map(Math.abs)
    if (moved < 1e-10) break
  }
  return best
}

/** Solves a small linear system by Gaussian elimination; null when singular. */
export function solve(a: number[][], b: number[]): number[] | null {
  const n = b.length
  const m = a.map((row, i) => [...row, b[i]])
  for (let col = 0; col < n; col++) {
    let pivot = col
    for (let r = col + 1; r < n; r++) if (Math.abs(m[r][col]) > Math.abs(m[pivot][col])) pivot = r
    if (!(Math.abs(m[pivot][col]) > 0)) return null
    ;[m[col], m[pivot]] = [m[pivot], m[col]]
    for (let r = 0; r < n; r++) {
      if (r === col) continue
      const f = m[r][col] / m[col][col]
      for (let c = col; c <= n; c++) m[r][c] -= f * m[col][c]
    }
  }
  return m.map((row, i) => row[n] / row[i])
}
