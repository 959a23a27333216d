// The REML fit behind mixedModel.ts, kept apart so the public file reads as the outputs.
//
// Model for the cell means: ȳ_ij = μ_j + b_i + c_ij + ē_ij. The deviations of ratings from
// their cell mean carry only the residual variance (their sum of squares, Σ(m − 1) degrees of
// freedom), so the fit never looks at single ratings again. Player i's cell means have the
// scaled covariance D_i + φ_b·11ᵀ with D_i = diag(φ_c + 1/m_ij), φ = variance / residual
// variance; Sherman–Morrison inverts it and gives its log-determinant in closed form, so one
// evaluation of the REML criterion costs O(Σ cells per player²) and no n × n matrix is built.

/** A panel reduced to cells (player × recipe), grouped by player, recipes ascending. */
export interface CellPanel {
  /** Recipes in the model (rated ones), indexed 0…k − 1. */
  k: number
  players: number
  /** Cells of player i are cellStart[i] … cellStart[i + 1] − 1. */
  cellStart: Int32Array
  cellRecipe: Int32Array
  cellCount: Float64Array
  /** Cell means, centred on the grand mean for accuracy. */
  cellMean: Float64Array
  /** Ratings used. */
  n: number
  /** Sum of squares of ratings about their cell mean. */
  ssWithin: number
  /** Whether the model has the player-by-recipe term. */
  withCells: boolean
  /** The most ratings in one cell. */
  maxCount: number
  /** Scratch space one evaluation reuses (evaluations never overlap). */
  work: { w: Float64Array; shrink: Float64Array; total: Float64Array; swr: Float64Array }
}

/** One evaluation at scaled variances φ = (φ_player, φ_cell). */
export interface Evaluation {
  /** log det of the scaled covariance of all ratings plus log det XᵀV⁻¹X (scaled): u(φ). */
  logDets: number
  /** Penalised residual sum of squares at the best fixed effects for these φ: q(φ). */
  pwrss: number
  /** Recipe means (centred). */
  beta: Float64Array
  /** With derivatives only: M⁻¹ = (XᵀV⁻¹X)⁻¹ in residual-variance units, k × k. */
  inverse: Float64Array | null
  /** ∂u/∂φ, ∂q/∂φ and ∂M/∂φ (k × k) for φ_player, φ_cell. */
  dLogDets: [number, number] | null
  dPwrss: [number, number] | null
  dM: [Float64Array, Float64Array] | null
}

/**
 * u, q and β̂ at φ; with `derivatives`, also their exact first derivatives in φ (the
 * envelope theorem gives ∂q/∂φ_t = −rᵀV⁻¹G_tV⁻¹r, G the term's pattern) and M⁻¹. φ may dip
 * just below 0 (derivatives across the bound): the formulas hold while V stays positive.
 */
export function evaluate(
  panel: CellPanel,
  phiPlayer: number,
  phiCell: number,
  derivatives: boolean,
): Evaluation | null {
  const { k, players, cellStart, cellRecipe, cellCount, cellMean } = panel
  const M = new Float64Array(k * k)
  const rhs = new Float64Array(k)
  const { w, shrink, total, swr: swrOf } = panel.work
  let logDets = 0
  let lastCount = -1
  let lastW = 0
  let lastLog = 0
  if (!(1 + panel.maxCount * phiCell > 0) || !(1 + phiCell > 0)) return null
  for (let i = 0; i < players; i++) {
    const from = cellStart[i]
    const to = cellStart[i + 1]
    let s = 0
    let swy = 0
    for (let c = from; c < to; c++) {
      const m = cellCount[c]
      // Counts repeat (1, 2 or 3 ratings a cell): reuse the weight and its log.
      if (m !== lastCount) {
        lastCount = m
        lastW = m / (1 + m * phiCell)
        lastLog = Math.log1p(m * phiCell)
      }
      w[c] = lastW
      s += lastW
      swy += lastW * cellMean[c]
      logDets += lastLog
    }
    const t = 1 + phiPlayer * s
    if (!(t > 0)) return null
    const g = phiPlayer / t
    shrink[i] = g
    total[i] = s
    logDets += Math.log(t)
    for (let c = from; c < to; c++) {
      const r = cellRecipe[c]
      const wc = w[c]
      M[r * k + r] += wc - g * wc * wc
      rhs[r] += wc * cellMean[c] - g * wc * swy
      const gw = g * wc
      // Cells run in recipe order, so r < cellRecipe[e]: fill the upper triangle only.
      const row = r * k
      for (let e = c + 1; e < to; e++) M[row + cellRecipe[e]] -= gw * w[e]
    }
  }
  if (!cholesky(M, k)) return null
  for (let r = 0; r < k; r++) logDets += 2 * Math.log(M[r * k + r])
  const beta = choleskySolve(M, k, rhs)
  let quad = 0
  for (let i = 0; i < players; i++) {
    let swr = 0
    for (let c = cellStart[i]; c < cellStart[i + 1]; c++) {
      const res = cellMean[c] - beta[cellRecipe[c]]
      quad += w[c] * res * res
      swr += w[c] * res
    }
    swrOf[i] = swr
    quad -= shrink[i] * swr * swr
  }
  const pwrss = panel.ssWithin + quad
  if (!derivatives) {
    return { logDets, pwrss, beta, inverse: null, dLogDets: null, dPwrss: null, dM: null }
  }
  const inverse = new Float64Array(k * k)
  const unit = new Float64Array(k)
  for (let r = 0; r < k; r++) {
    unit.fill(0)
    unit[r] = 1
    const col = choleskySolve(M, k, unit)
    for (let x = 0; x < k; x++) inverse[x * k + r] = col[x]
  }
  const dMp = new Float64Array(k * k)
  const dMc = new Float64Array(k * k)
  let duP = 0
  let duC = 0
  let dqP = 0
  let dqC = 0
  for (let i = 0; i < players; i++) {
    const from = cellStart[i]
    const to = cellStart[i + 1]
    const g = shrink[i]
    const s = total[i]
    const t = 1 / (1 + phiPlayer * s)
    let s2 = 0
    let sw = 0
    for (let c = from; c < to; c++) {
      s2 += w[c] * w[c]
      sw += w[c]
    }
    duP += s * t
    // d/dφ_c of Σ log(1 + mφ_c) is Σ w; of log(1 + φ_p s) it is −φ_p t Σ w².
    duC += sw - phiPlayer * t * s2
    const swr = swrOf[i]
    dqP -= swr * t * swr * t
    const g2s2 = g * g * s2
    for (let c = from; c < to; c++) {
      const r = cellRecipe[c]
      const wc = w[c]
      const v = wc * (cellMean[c] - beta[r]) - g * wc * swr
      dqC -= v * v
      // ∂M/∂φ_p = −Σ u uᵀ, u = V⁻¹1 = w t; ∂M/∂φ_c = −Σ Xᵀ V⁻² X, V⁻¹ = W − g w wᵀ.
      const uc = wc * t
      const row = r * k
      dMp[row + r] -= uc * uc
      dMc[row + r] -= wc * wc - 2 * g * wc * wc * wc + g2s2 * wc * wc
      // Upper triangle here, mirrored below.
      for (let e = c + 1; e < to; e++) {
        const q = row + cellRecipe[e]
        const we = w[e]
        dMp[q] -= uc * we * t
        dMc[q] += g * wc * we * (wc + we) - g2s2 * wc * we
      }
    }
  }
  for (let x = 0; x < k; x++) {
    for (let y = x + 1; y < k; y++) {
      dMp[y * k + x] = dMp[x * k + y]
      dMc[y * k + x] = dMc[x * k + y]
    }
  }
  let trP = 0
  let trC = 0
  for (let x = 0; x < k * k; x++) {
    trP += inverse[x] * dMp[x]
    trC += inverse[x] * dMc[x]
  }
  return {
    logDets,
    pwrss,
    beta,
    inverse,
    dLogDets: [duP + trP, duC + trC],
    dPwrss: [dqP, dqC],
    dM: [dMp, dMc],
  }
}

export interface SecondDerivatives {
  /** ∂²u/∂φ_a∂φ_b and ∂²q/∂φ_a∂φ_b, a, b ∈ {player, cell}. */
  logDets: number[][]
  pwrss: number[][]
}

/**
 * Exact second derivatives of u and q in φ at an evaluation made with derivatives, from
 * ∂² log det V = −tr(V⁻¹G_aV⁻¹G_b), ∂² log det M = tr(M⁻¹∂²M) − tr(M⁻¹∂_aM M⁻¹∂_bM), and for
 * q (β̂ moves with φ) F_ab − 2 h_aᵀM⁻¹h_b, h_a = Σ XᵀV⁻¹G_aV⁻¹r. Per player V⁻¹ = W − g w wᵀ,
 * so every trace is O(cells²) and no player's matrix is formed beyond its k_i × k_i block.
 */
export function secondDerivatives(
  panel: CellPanel,
  phiPlayer: number,
  phiCell: number,
  e: Evaluation,
): SecondDerivatives {
  const { k, players, cellStart, cellRecipe, cellCount, cellMean } = panel
  const inv = e.inverse as Float64Array
  const [dMp, dMc] = e.dM as [Float64Array, Float64Array]
  const beta = e.beta
  const wl = new Float64Array(Math.max(1, k))
  const vl = new Float64Array(Math.max(1, k))
  const hp = new Float64Array(k)
  const hc = new Float64Array(k)
  let ldPP = 0
  let ldPC = 0
  let ldCC = 0
  let mPP = 0
  let mPC = 0
  let mCC = 0
  let fPP = 0
  let fPC = 0
  let fCC = 0
  for (let i = 0; i < players; i++) {
    const from = cellStart[i]
    const ki = cellStart[i + 1] - from
    let s = 0
    let s2 = 0
    let s3 = 0
    let swr = 0
    for (let a = 0; a < ki; a++) {
      const m = cellCount[from + a]
      const w = m / (1 + m * phiCell)
      wl[a] = w
      s += w
      s2 += w * w
      s3 += w * w * w
      swr += w * (cellMean[from + a] - beta[cellRecipe[from + a]])
    }
    const t = 1 / (1 + phiPlayer * s)
    const g = phiPlayer * t
    // v = V⁻¹r; u = V⁻¹1 = t·w, so every form in u is one in w.
    let wv = 0
    let vAv = 0
    for (let a = 0; a < ki; a++) {
      const w = wl[a]
      const v = w * (cellMean[from + a] - beta[cellRecipe[from + a]]) - g * w * swr
      vl[a] = v
      wv += w * v
      vAv += w * v * v
    }
    vAv -= g * wv * wv
    const sumV = swr * t
    const st = s * t
    // log det V_i: −tr(V⁻¹G_aV⁻¹G_b).
    ldPP -= st * st
    ldPC -= t * t * s2
    ldCC -= s2 - 2 * g * s3 + g * g * s2 * s2
    // Q = X M⁻¹ Xᵀ on this player's cells, seen only through w·Qw, w·Qa, a·Qa, w·Qb and
    // Σ Q_cc w³, with a = w², b = w³ (elementwise).
    let wQw = 0
    let wQa = 0
    let aQa = 0
    let wQb = 0
    let diag = 0
    for (let x = 0; x < ki; x++) {
      const row = cellRecipe[from + x] * k
      const wx = wl[x]
      let qw = 0
      let qa = 0
      for (let y = 0; y < ki; y++) {
        const q = inv[row + cellRecipe[from + y]]
        const wy = wl[y]
        qw += q * wy
        qa += q * wy * wy
      }
      wQw += wx * qw
      wQa += wx * qa
      aQa += wx * wx * qa
      wQb += wx * wx * wx * qw
      diag += inv[row + cellRecipe[from + x]] * wx * wx * wx
    }
    // tr(Q ∂²M-parts): tr(Q V⁻¹G_aV⁻¹G_bV⁻¹) for (p, p), (p, c), (c, c), V⁻³ expanded.
    mPP += 2 * st * t * t * wQw
    mPC += 2 * t * t * (wQa - g * s2 * wQw)
    mCC +=
      2 *
      (diag - g * (2 * wQb + aQa) + 2 * g * g * s2 * wQa + (g * g * s3 - g * g * g * s2 * s2) * wQw)
    // q: F_ab per player, h_a summed over players.
    let uv = 0
    for (let a = 0; a < ki; a++) uv += wl[a] * t * vl[a]
    fPP += 2 * sumV * sumV * st
    fPC += 2 * sumV * uv
    fCC += 2 * vAv
    for (let a = 0; a < ki; a++) {
      const r = cellRecipe[from + a]
      hp[r] += wl[a] * t * sumV
      hc[r] += wl[a] * vl[a] - g * wl[a] * wv
    }
  }
  const traceProduct = (A: Float64Array, B: Float64Array) => {
    // tr(M⁻¹ A M⁻¹ B) with A, B symmetric.
    const left = product(inv, A, k)
    const right = product(inv, B, k)
    let total = 0
    for (let x = 0; x < k; x++)
      for (let y = 0; y < k; y++) total += left[x * k + y] * right[y * k + x]
    return total
  }
  const form = (a: Float64Array, b: Float64Array) => {
    let total = 0
    for (let x = 0; x < k; x++) for (let y = 0; y < k; y++) total += a[x] * inv[x * k + y] * b[y]
    return total
  }
  const uPP = ldPP + mPP - traceProduct(dMp, dMp)
  const uPC = ldPC + mPC - traceProduct(dMp, dMc)
  const uCC = ldCC + mCC - traceProduct(dMc, dMc)
  const qPP = fPP - 2 * form(hp, hp)
  const qPC = fPC - 2 * form(hp, hc)
  const qCC = fCC - 2 * form(hc, hc)
  return {
    logDets: [
      [uPP, uPC],
      [uPC, uCC],
    ],
    pwrss: [
      [qPP, qPC],
      [qPC, qCC],
    ],
  }
}

function product(A: Float64Array, B: Float64Array, k: number): Float64Array {
  const out = new Float64Array(k * k)
  for (let x = 0; x < k; x++)
    for (let z = 0; z < k; z++) {
      const a = A[x * k + z]
      if (a === 0) continue
      for (let y = 0; y < k; y++) out[x * k + y] += a * B[z * k + y]
    }
  return out
}

/** In-place upper Cholesky (M = UᵀU, U in the upper triangle); false when not positive. */
function cholesky(M: Float64Array, k: number): boolean {
  for (let j = 0; j < k; j++) {
    let d = M[j * k + j]
    for (let p = 0; p < j; p++) d -= M[p * k + j] * M[p * k + j]
    if (!(d > 0)) return false
    const u = Math.sqrt(d)
    M[j * k + j] = u
    for (let c = j + 1; c < k; c++) {
      let v = M[j * k + c]
      for (let p = 0; p < j; p++) v -= M[p * k + j] * M[p * k + c]
      M[j * k + c] = v / u
    }
  }
  return true
}

function choleskySolve(U: Float64Array, k: number, b: Float64Array): Float64Array {
  const x = Float64Array.from(b)
  for (let j = 0; j < k; j++) {
    let v = x[j]
    for (let p = 0; p < j; p++) v -= U[p * k + j] * x[p]
    x[j] = v / U[j * k + j]
  }
  for (let j = k - 1; j >= 0; j--) {
    let v = x[j]
    for (let p = j + 1; p < k; p++) v -= U[j * k + p] * x[p]
    x[j] = v / U[j * k + j]
  }
  return x
}

/** The REML criterion with the residual variance profiled out, as lme4 reports it. */
export function profiledCriterion(panel: CellPanel, e: Evaluation): number {
  const dfResid = panel.n - panel.k
  return e.logDets + dfResid * (1 + Math.log((2 * Math.PI * e.pwrss) / dfResid))
}

/** Its gradient in φ, from the exact derivatives of u and q. */
function profiledGradient(panel: CellPanel, e: Evaluation): [number, number] {
  const dfResid = panel.n - panel.k
  const du = e.dLogDets as [number, number]
  const dq = e.dPwrss as [number, number]
  return [du[0] + (dfResid * dq[0]) / e.pwrss, du[1] + (dfResid * dq[1]) / e.pwrss]
}

export interface Optimum {
  /** Scaled variances at the optimum; φ_cell is 0 when the term is not in the model. */
  phi: [number, number]
  at: Evaluation
}

/**
 * Minimises the profiled REML criterion over φ ≥ 0 by projected Newton steps with its exact
 * gradient and Hessian. A term whose variance belongs on the boundary ends
 * exactly at 0, as lme4's bounded optimiser leaves it. Null when the criterion runs off to −∞
 * (a perfect fit) or no step can be taken.
 */
export function fitReml(panel: CellPanel): Optimum | null {
  const dims = panel.withCells ? 2 : 1
  const phi = startingValues(panel)
  const point = (p: [number, number]) => {
    const e = evaluate(panel, p[0], p[1], true)
    if (e === null || !(e.pwrss > 0)) return null
    const f = profiledCriterion(panel, e)
    return Number.isFinite(f) ? { e, f, g: profiledGradient(panel, e) } : null
  }
  let here = point(phi)
  if (here === null) return null
  let previous: number[][] | null = null
  for (let iter = 0; iter < 100; iter++) {
    const { g, f } = here
    if (dims === 1) g[1] = 0
    // Variables held at the bound: at 0 with the criterion rising inwards.
    const free = [0, 1].map((a) => a < dims && (phi[a] > 0 || g[a] < 0))
    if (!free[0] && !free[1]) break
    // Newton converges quadratically: once the last Hessian asks for a step below 1e-10 of φ,
    // the optimum is found to far better than that.
    if (previous !== null && relativeChange(phi, newtonStep(g, previous, free), free) < 1e-10) {
      break
    }
    const H = profiledHessian(panel, phi, here.e)
    if (dims === 1) H[0][1] = H[1][0] = H[1][1] = 0
    previous = H
    const step = newtonStep(g, H, free)
    let alpha = 1
    let next: ReturnType<typeof point> = null
    let trial: [number, number] = phi
    for (let tries = 0; tries < 60; tries++) {
      trial = [Math.max(0, phi[0] + alpha * step[0]), Math.max(0, phi[1] + alpha * step[1])]
      const descent = g[0] * (trial[0] - phi[0]) + g[1] * (trial[1] - phi[1])
      const candidate = point(trial)
      // Close to the optimum f stops resolving steps; a falling slope still says "go on".
      if (
        candidate !== null &&
        (candidate.f <= f + 1e-4 * descent || descent > -1e-13 * Math.abs(f))
      ) {
        next = candidate
        break
      }
      alpha /= 2
    }
    if (next === null) break
    const moved = relativeChange(phi, [trial[0] - phi[0], trial[1] - phi[1]], [true, true])
    phi[0] = trial[0]
    phi[1] = trial[1]
    here = next
    if (phi[0] > 1e8 || phi[1] > 1e8) return null
    if (moved < 1e-12) break
  }
  return { phi, at: here.e }
}

/** Hessian in φ of the profiled criterion u + (n − p) log q + const. */
function profiledHessian(panel: CellPanel, phi: [number, number], e: Evaluation): number[][] {
  const dfResid = panel.n - panel.k
  const second = secondDerivatives(panel, phi[0], phi[1], e)
  const dq = e.dPwrss as [number, number]
  const q = e.pwrss
  return [0, 1].map((a) =>
    [0, 1].map(
      (b) => second.logDets[a][b] + dfResid * (second.pwrss[a][b] / q - (dq[a] * dq[b]) / (q * q)),
    ),
  )
}

function relativeChange(phi: number[], step: number[], free: boolean[]): number {
  let worst = 0
  for (let a = 0; a < 2; a++) {
    if (!free[a]) continue
    const next = Math.max(0, phi[a] + step[a])
    worst = Math.max(worst, Math.abs(next - phi[a]) / Math.max(next, phi[a], 1e-3))
  }
  return worst
}

/**
 * Rough moment estimates to start from, so Newton needs few steps: the residual variance from
 * the spread within cells, the cell term from what a player-plus-recipe fit of the cell means
 * leaves, the player term from the spread of player means. Kept inside [0.01, 100].
 */
function startingValues(panel: CellPanel): [number, number] {
  const { k, players, cellStart, cellRecipe, cellCount, cellMean } = panel
  const cells = cellRecipe.length
  const recipeSum = new Float64Array(k)
  const recipeCells = new Float64Array(k)
  const playerMean = new Float64Array(players)
  let inverseCount = 0
  for (let i = 0; i < players; i++) {
    let sum = 0
    for (let c = cellStart[i]; c < cellStart[i + 1]; c++) {
      sum += cellMean[c]
      recipeSum[cellRecipe[c]] += cellMean[c]
      recipeCells[cellRecipe[c]]++
      inverseCount += 1 / cellCount[c]
    }
    playerMean[i] = sum / (cellStart[i + 1] - cellStart[i])
  }
  let grand = 0
  for (let i = 0; i < players; i++) grand += playerMean[i]
  grand /= players
  let ssCells = 0
  let ssPlayers = 0
  for (let i = 0; i < players; i++) {
    ssPlayers += (playerMean[i] - grand) ** 2
    for (let c = cellStart[i]; c < cellStart[i + 1]; c++) {
      const r = cellRecipe[c]
      const e = cellMean[c] - playerMean[i] - recipeSum[r] / recipeCells[r] + grand
      ssCells += e * e
    }
  }
  const cellDf = Math.max(1, cells - players - k + 1)
  const leftOver = ssCells / cellDf
  const withinDf = panel.n - cells
  const sigma2 =
    panel.withCells && withinDf > 0 && panel.ssWithin > 0 ? panel.ssWithin / withinDf : leftOver
  const meanInverse = inverseCount / cells
  const cellVariance = panel.withCells ? Math.max(0, leftOver - sigma2 * meanInverse) : 0
  const perPlayer = cells / players
  const playerVariance = Math.max(
    0,
    ssPlayers / Math.max(1, players - 1) - (cellVariance + sigma2 * meanInverse) / perPlayer,
  )
  const clamp = (v: number) => (Number.isFinite(v) ? Math.min(100, Math.max(0.01, v)) : 1)
  const scale = sigma2 > 0 ? sigma2 : 1
  return [clamp(playerVariance / scale), panel.withCells ? clamp(cellVariance / scale) : 0]
}

/** Newton step on the free variables, falling back to scaled descent where H is not positive. */
function newtonStep(g: number[], H: number[][], free: boolean[]): number[] {
  const step = [0, 0]
  if (free[0] && free[1]) {
    const det = H[0][0] * H[1][1] - H[0][1] * H[1][0]
    if (H[0][0] > 0 && det > 0) {
      step[0] = -(H[1][1] * g[0] - H[0][1] * g[1]) / det
      step[1] = -(H[0][0] * g[1] - H[1][0] * g[0]) / det
      return step
    }
  }
  for (let a = 0; a < 2; a++) {
    if (!free[a]) continue
    const c = H[a][a] > 0 && !(free[0] && free[1]) ? H[a][a] : Math.max(Math.abs(H[a][a]), 1)
    step[a] = -g[a] / c
  }
  return step
}

/** Symmetric eigen-decomposition by cyclic Jacobi rotations; values in decreasing order. */
export function symmetricEigen(A: number[][]): { values: number[]; vectors: number[][] } {
  const n = A.length
  const a = A.map((row) => row.slice())
  const v: number[][] = A.map((_, i) => A.map((__, j) => (i === j ? 1 : 0)))
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += a[p][q] * a[p][q]
    if (off < 1e-30) break
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        if (a[p][q] === 0) continue
        const theta = (a[q][q] - a[p][p]) / (2 * a[p][q])
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1))
        const c = 1 / Math.sqrt(t * t + 1)
        const s = t * c
        for (let r = 0; r < n; r++) {
          const arp = a[r][p]
          const arq = a[r][q]
          a[r][p] = c * arp - s * arq
          a[r][q] = s * arp + c * arq
        }
        for (let r = 0; r < n; r++) {
          const apr = a[p][r]
          const aqr = a[q][r]
          a[p][r] = c * apr - s * aqr
          a[q][r] = s * apr + c * aqr
        }
        for (let r = 0; r < n; r++) {
          const vrp = v[r][p]
          const vrq = v[r][q]
          v[r][p] = c * vrp - s * vrq
          v[r][q] = s * vrp + c * vrq
        }
      }
    }
  }
  const order = a.map((_, i) => i).sort((x, y) => a[y][y] - a[x][x])
  return {
    values: order.map((i) => a[i][i]),
    vectors: order.map((i) => v.map((row) => row[i])),
  }
}
