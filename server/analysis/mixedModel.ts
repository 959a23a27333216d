import betainc from '@stdlib/math-base-special-betainc'
import tCdf from '@stdlib/stats-base-dists-t-cdf'
import tQuantile from '@stdlib/stats-base-dists-t-quantile'
import jstatPkg from 'jstat'
import {
  fitReml,
  secondDerivatives,
  symmetricEigen,
  type CellPanel,
  type Evaluation,
} from './mixedModelFit.ts'
import type { Id, Interval, Reason } from './types.ts'

const { jStat } = jstatPkg

/**
 * Why a mixed-model figure is missing. The shared reasons plus two of this model's own: the
 * player is the block, so its variance needs at least two players; and the Tukey p of a pair
 * needs at least 2 Satterthwaite df (the pair's other figures stand).
 */
export type MixedModelReason =
  | Reason
  | 'fewer than two players'
  | 'fewer than 2 degrees of freedom'
  | 'too few ratings for the model'

export interface MixedModelRating {
  player: Id
  recipe: Id
  /** 0–100 on the attribute's line scale. */
  value: number
}

export interface MixedModelOptions {
  /** For the confidence intervals of the recipe means: 1 − alpha coverage. Default 0.05. */
  alpha?: number
}

export interface VarianceComponents {
  player: number | null
  /** Null when the model has no player-by-recipe term (no cell was rated twice). */
  playerRecipe: number | null
  residual: number | null
  /** The REML criterion at the optimum (−2 × restricted log-likelihood). */
  remlCriterion: number | null
  reason: MixedModelReason
}

export interface RecipeTest {
  f: number | null
  numDf: number | null
  denDf: number | null
  p: number | null
  reason: MixedModelReason
}

export interface MarginalMean {
  recipe: Id
  /** Ratings of this recipe used. */
  n: number
  estimate: number | null
  se: number | null
  df: number | null
  ci: Interval | null
  reason: MixedModelReason
}

/** recipeA − recipeB, in recipe order (A comes first). */
export interface RecipeContrast {
  recipeA: Id
  recipeB: Id
  estimate: number | null
  se: number | null
  df: number | null
  t: number | null
  /** Unadjusted two-sided p. */
  p: number | null
  /** Tukey-adjusted p over all pairs of rated recipes (studentized range); needs df ≥ 2. */
  pTukey: number | null
  reason: MixedModelReason
}

export interface MixedModelResult {
  /** The random terms fitted beside the recipe: player, and player:recipe when cells repeat. */
  terms: ('player' | 'player:recipe')[]
  n: number
  players: number
  cells: number
  variance: VarianceComponents
  recipeTest: RecipeTest
  means: MarginalMean[]
  contrasts: RecipeContrast[]
  reason: MixedModelReason
}

/**
 * The linear mixed model of one attribute, fitted by REML: rating ~ recipe + (1 | player) +
 * (1 | player:recipe) when some player rated some recipe more than once, else rating ~ recipe
 * + (1 | player). Gives the variance components, the recipe F test with Satterthwaite
 * denominator df (Fai–Cornelius for several df), the recipe means with Satterthwaite df and
 * their pairwise differences with unadjusted and Tukey p, the conventions of lme4, lmerTest
 * and emmeans. Ratings must be finite: a NaN means the caller lost track of its data, so it
 * throws rather than guessing. Recipes listed in `recipes` but never rated appear with a
 * reason; ratings of recipes not listed throw.
 */
export function mixedModel(
  ratings: readonly MixedModelRating[],
  recipes: readonly Id[],
  options: MixedModelOptions = {},
): MixedModelResult {
  const { alpha = 0.05 } = options
  if (!(alpha > 0 && alpha < 1)) throw new RangeError('mixedModel: alpha must be in (0, 1)')
  const built = buildPanel(ratings, recipes)
  const { panel, rated, recipeN, grandMean, spread } = built
  const result = emptyResult(built, recipes)
  const fail = (reason: MixedModelReason): MixedModelResult => withReason(result, reason)
  if (panel.n === 0) return fail('nobody rated this attribute')
  if (panel.players < 2) return fail('fewer than two players')
  if (spread === 0) {
    // Every rating equal: the means are known exactly and nothing else is.
    for (const mean of result.means) if (mean.n > 0) mean.estimate = grandMean
    return fail('no variance')
  }
  // lme4's rule: each random term needs fewer levels than ratings, and the residual needs df.
  if (panel.players >= panel.n || panel.n - panel.k < 1)
    return fail('too few ratings for the model')
  const optimum = fitReml(panel)
  if (optimum === null) return fail('no finite estimate')
  const s = satterthwaite(panel, optimum.phi, optimum.at)
  if (s === null) return fail('no finite estimate')

  const { sigma2 } = s
  result.variance = {
    player: optimum.phi[0] * sigma2,
    playerRecipe: panel.withCells ? optimum.phi[1] * sigma2 : null,
    residual: sigma2,
    remlCriterion: s.criterion,
    reason: null,
  }
  const beta = optimum.at.beta
  const k = panel.k
  const unit = (a: number, b = -1) => {
    const l = new Float64Array(k)
    l[a] = 1
    if (b >= 0) l[b] = -1
    return l
  }
  const critical = (df: number) => tQuantile(1 - alpha / 2, df)
  for (const mean of result.means) {
    const j = rated.get(mean.recipe)
    if (j === undefined) continue
    const { variance, df } = s.contrast(unit(j))
    const estimate = beta[j] + grandMean
    mean.estimate = estimate
    mean.se = Math.sqrt(variance)
    if (!(df > 0 && Number.isFinite(df))) {
      mean.reason = 'no finite estimate'
      continue
    }
    const half = critical(df) * mean.se
    mean.df = df
    mean.ci = { lower: estimate - half, upper: estimate + half }
    mean.reason = null
  }
  for (const pair of result.contrasts) {
    const a = rated.get(pair.recipeA)
    const b = rated.get(pair.recipeB)
    if (a === undefined || b === undefined) continue
    const { variance, df } = s.contrast(unit(a, b))
    pair.estimate = beta[a] - beta[b]
    pair.se = Math.sqrt(variance)
    if (!(df > 0 && Number.isFinite(df) && variance > 0)) {
      pair.reason = 'no finite estimate'
      continue
    }
    const t = pair.estimate / pair.se
    pair.df = df
    pair.t = t
    pair.p = Math.min(1, 2 * tCdf(-Math.abs(t), df))
    pair.reason = null
    // The studentized range is defined from 2 df (R's ptukey gives NaN below, as jStat does).
    if (df < 2) {
      pair.reason = 'fewer than 2 degrees of freedom'
      continue
    }
    // The studentized range has no upper-tail routine here; R's ptukey also forms 1 − lower.
    pair.pTukey = Math.min(1, Math.max(0, 1 - jStat.tukey.cdf(Math.abs(t) * Math.SQRT2, k, df)))
  }
  result.recipeTest = k < 2 ? emptyTest('fewer than two recipes') : recipeFTest(s, beta, recipeN)
  result.reason = null
  return result
}

interface BuiltPanel {
  panel: CellPanel
  /** Recipe → model index, rated recipes only, in the given order. */
  rated: Map<Id, number>
  /** Ratings per model recipe. */
  recipeN: Float64Array
  /** Ratings per listed recipe. */
  listedN: Map<Id, number>
  grandMean: number
  /** Largest distance of a rating from the grand mean; 0 when all are equal. */
  spread: number
}

function buildPanel(ratings: readonly MixedModelRating[], recipes: readonly Id[]): BuiltPanel {
  const listed = new Map<Id, number>()
  recipes.forEach((r, j) => {
    if (listed.has(r)) throw new RangeError(`mixedModel: recipe ${String(r)} is listed twice`)
    listed.set(r, j)
  })
  const n = ratings.length
  const counts = new Array<number>(recipes.length).fill(0)
  const playerIndex = new Map<Id, number>()
  const playerOf = new Int32Array(n)
  const listedOf = new Int32Array(n)
  let sum = 0
  for (let i = 0; i < n; i++) {
    const r = ratings[i]
    if (!Number.isFinite(r.value)) {
      throw new RangeError(`mixedModel: ratings must be finite numbers (entry ${i} is ${r.value})`)
    }
    const j = listed.get(r.recipe)
    if (j === undefined) {
      throw new RangeError(`mixedModel: rating ${i} is of recipe ${String(r.recipe)}, not listed`)
    }
    let p = playerIndex.get(r.player)
    if (p === undefined) {
      p = playerIndex.size
      playerIndex.set(r.player, p)
    }
    counts[j]++
    playerOf[i] = p
    listedOf[i] = j
    sum += r.value
  }
  const grandMean = n > 0 ? sum / n : 0
  const rated = new Map<Id, number>()
  const listedN = new Map<Id, number>()
  const modelIndex = new Int32Array(recipes.length).fill(-1)
  recipes.forEach((r, j) => {
    listedN.set(r, counts[j])
    if (counts[j] > 0) {
      modelIndex[j] = rated.size
      rated.set(r, rated.size)
    }
  })
  const k = rated.size
  const players = playerIndex.size
  const recipeN = new Float64Array(k)
  recipes.forEach((_, j) => {
    if (modelIndex[j] >= 0) recipeN[modelIndex[j]] = counts[j]
  })

  // Ratings bucketed by player (a counting sort), then each player's cells in recipe order.
  const playerStart = new Int32Array(players + 1)
  for (let i = 0; i < n; i++) playerStart[playerOf[i] + 1]++
  for (let p = 0; p < players; p++) playerStart[p + 1] += playerStart[p]
  const fill = playerStart.slice(0, players)
  const byPlayer = new Int32Array(n)
  for (let i = 0; i < n; i++) byPlayer[fill[playerOf[i]]++] = i
  const slotCount = new Float64Array(k)
  const slotSum = new Float64Array(k)
  const cellStart = new Int32Array(players + 1)
  const cellRecipe: number[] = []
  const cellCount: number[] = []
  const cellMean: number[] = []
  let spread = 0
  let ssWithin = 0
  for (let p = 0; p < players; p++) {
    for (let at = playerStart[p]; at < playerStart[p + 1]; at++) {
      const i = byPlayer[at]
      const r = modelIndex[listedOf[i]]
      const centred = ratings[i].value - grandMean
      spread = Math.max(spread, Math.abs(centred))
      slotCount[r]++
      slotSum[r] += centred
    }
    for (let r = 0; r < k; r++) {
      if (slotCount[r] === 0) continue
      cellRecipe.push(r)
      cellCount.push(slotCount[r])
      slotSum[r] /= slotCount[r]
      cellMean.push(slotSum[r])
    }
    for (let at = playerStart[p]; at < playerStart[p + 1]; at++) {
      const i = byPlayer[at]
      const r = modelIndex[listedOf[i]]
      const d = ratings[i].value - grandMean - slotSum[r]
      ssWithin += d * d
    }
    for (let r = 0; r < k; r++) slotCount[r] = slotSum[r] = 0
    cellStart[p + 1] = cellRecipe.length
  }
  const cells = cellRecipe.length
  // Ratings equal to rounding noise count as equal, as R treats a constant response.
  if (spread <= 1e-12 * Math.max(1, Math.abs(grandMean))) spread = 0
  let maxCount = 0
  for (let c = 0; c < cells; c++) maxCount = Math.max(maxCount, cellCount[c])
  const panel: CellPanel = {
    k,
    players,
    cellStart,
    cellRecipe: Int32Array.from(cellRecipe),
    cellCount: Float64Array.from(cellCount),
    cellMean: Float64Array.from(cellMean),
    n,
    ssWithin,
    withCells: maxCount > 1,
    maxCount,
    work: {
      w: new Float64Array(cells),
      shrink: new Float64Array(players),
      total: new Float64Array(players),
      swr: new Float64Array(players),
    },
  }
  return { panel, rated, recipeN, listedN, grandMean, spread }
}

function emptyTest(reason: MixedModelReason): RecipeTest {
  return { f: null, numDf: null, denDf: null, p: null, reason }
}

function emptyResult(built: BuiltPanel, recipes: readonly Id[]): MixedModelResult {
  const { panel, listedN } = built
  const means: MarginalMean[] = recipes.map((recipe) => ({
    recipe,
    n: listedN.get(recipe) as number,
    estimate: null,
    se: null,
    df: null,
    ci: null,
    reason:
      (listedN.get(recipe) as number) > 0 ? 'too few ratings for the model' : 'nobody rated it',
  }))
  const contrasts: RecipeContrast[] = []
  for (let a = 0; a < recipes.length; a++) {
    for (let b = a + 1; b < recipes.length; b++) {
      const bothRated =
        (listedN.get(recipes[a]) as number) > 0 && (listedN.get(recipes[b]) as number) > 0
      contrasts.push({
        recipeA: recipes[a],
        recipeB: recipes[b],
        estimate: null,
        se: null,
        df: null,
        t: null,
        p: null,
        pTukey: null,
        reason: bothRated ? 'too few ratings for the model' : 'nobody rated it',
      })
    }
  }
  return {
    terms: panel.withCells ? ['player', 'player:recipe'] : ['player'],
    n: panel.n,
    players: panel.players,
    cells: panel.cellRecipe.length,
    variance: {
      player: null,
      playerRecipe: null,
      residual: null,
      remlCriterion: null,
      reason: 'too few ratings for the model',
    },
    recipeTest: emptyTest('too few ratings for the model'),
    means,
    contrasts,
    reason: 'too few ratings for the model',
  }
}

/** Puts the model's reason on every figure that has not one of its own. */
function withReason(result: MixedModelResult, reason: MixedModelReason): MixedModelResult {
  result.reason = reason
  result.variance.reason = reason
  result.recipeTest.reason = reason
  for (const m of result.means) if (m.reason !== 'nobody rated it') m.reason = reason
  for (const c of result.contrasts) if (c.reason !== 'nobody rated it') c.reason = reason
  return result
}

interface SatterthwaiteFit {
  sigma2: number
  criterion: number
  /** Variance of l·β and its Satterthwaite df. */
  contrast: (l: Float64Array) => { variance: number; df: number }
  inverse: Float64Array
}

/**
 * Satterthwaite's df as lmerTest forms them: the variance parameters are (θ, σ), θ the random
 * standard deviations over σ as in lme4; their covariance is 2 × the (pseudo-)inverse of the
 * Hessian of the REML deviance; a contrast's df is 2·var² / (gᵀ A g), g the gradient of its
 * variance. In θ = √φ the deviance is even, so a term fitted at 0 has zero gradient and drops
 * out, as it does under lmerTest's numerical derivatives. All derivatives here are exact.
 */
function satterthwaite(
  panel: CellPanel,
  phi: [number, number],
  centre: Evaluation,
): SatterthwaiteFit | null {
  const r = panel.withCells ? 2 : 1
  const theta = [Math.sqrt(phi[0]), Math.sqrt(phi[1])]
  const k = panel.k
  const dfResid = panel.n - panel.k
  const q0 = centre.pwrss
  const sigma2 = q0 / dfResid
  const sigma = Math.sqrt(sigma2)
  const inv0 = centre.inverse as Float64Array
  const du = centre.dLogDets as [number, number]
  const dq = centre.dPwrss as [number, number]

  const second = secondDerivatives(panel, phi[0], phi[1], centre)
  const d2u = second.logDets
  const d2q = second.pwrss
  const sym = (m: number[][], a: number, b: number) => (m[a][b] + m[b][a]) / 2
  // Chain rule to θ: ∂/∂θ = 2θ ∂/∂φ, ∂²/∂θ_a∂θ_b = 4θ_aθ_b ∂²/∂φ_a∂φ_b + 2δ_ab ∂/∂φ_a.
  const H: number[][] = Array.from({ length: r + 1 }, () => new Array<number>(r + 1).fill(0))
  for (let a = 0; a < r; a++) {
    for (let b = 0; b < r; b++) {
      const uab = 4 * theta[a] * theta[b] * sym(d2u, a, b) + (a === b ? 2 * du[a] : 0)
      const qab = 4 * theta[a] * theta[b] * sym(d2q, a, b) + (a === b ? 2 * dq[a] : 0)
      H[a][b] = uab + qab / sigma2
    }
    H[a][r] = H[r][a] = (-2 * (2 * theta[a] * dq[a])) / (sigma2 * sigma)
  }
  // Hessian of −2 log L_R(θ, σ) = u(θ) + q(θ)/σ² + (n − p) log(2πσ²) in σ.
  H[r][r] = (6 * q0) / (sigma2 * sigma2) - (2 * dfResid) / sigma2
  if (!H.flat().every(Number.isFinite)) return null
  // lmerTest: covariance of the variance parameters from the eigenvalues above 1e-8 only.
  const eig = symmetricEigen(H)
  const A: number[][] = H.map(() => new Array<number>(r + 1).fill(0))
  eig.values.forEach((value, m) => {
    if (!(value > 1e-8)) return
    const v = eig.vectors[m]
    for (let x = 0; x <= r; x++) for (let y = 0; y <= r; y++) A[x][y] += (2 * v[x] * v[y]) / value
  })
  // ∂M⁻¹/∂θ_a = −2θ_a M⁻¹ (∂M/∂φ_a) M⁻¹.
  const dM = centre.dM as [Float64Array, Float64Array]
  const dInv = theta.slice(0, r).map((t, a) => {
    const out = new Float64Array(k * k)
    if (t === 0) return out
    const tmp = new Float64Array(k * k)
    for (let x = 0; x < k; x++)
      for (let z = 0; z < k; z++) {
        let v = 0
        for (let y = 0; y < k; y++) v += inv0[x * k + y] * dM[a][y * k + z]
        tmp[x * k + z] = v
      }
    for (let x = 0; x < k; x++)
      for (let z = 0; z < k; z++) {
        let v = 0
        for (let y = 0; y < k; y++) v += tmp[x * k + y] * inv0[y * k + z]
        out[x * k + z] = -2 * t * v
      }
    return out
  })

  const form = (l: Float64Array, S: Float64Array) => {
    let total = 0
    for (let x = 0; x < k; x++) {
      if (l[x] === 0) continue
      let row = 0
      for (let y = 0; y < k; y++) row += S[x * k + y] * l[y]
      total += l[x] * row
    }
    return total
  }
  const gradient = (l: Float64Array) => {
    const g = dInv.map((d) => sigma2 * form(l, d))
    g.push(2 * sigma * form(l, inv0))
    return g
  }
  const contrast = (l: Float64Array) => {
    const variance = sigma2 * form(l, inv0)
    const g = gradient(l)
    let gAg = 0
    for (let x = 0; x <= r; x++) for (let y = 0; y <= r; y++) gAg += g[x] * A[x][y] * g[y]
    return { variance, df: (2 * variance * variance) / gAg }
  }
  const criterion = centre.logDets + dfResid * (1 + Math.log(2 * Math.PI * sigma2))
  return { sigma2, criterion, contrast, inverse: inv0 }
}

/**
 * The recipe F test of lmerTest's anova: with recipe the only fixed term its type III test is
 * the type I one, whose contrasts are the recipe rows of the Doolittle factor of XᵀX in
 * treatment coding. The denominator df follow Fai and Cornelius: eigen-decompose L·C·Lᵀ, one
 * Satterthwaite df ν_m per eigenvector, E = Σ ν_m/(ν_m − 2), ddf = 2E/(E − q).
 */
function recipeFTest(s: SatterthwaiteFit, beta: Float64Array, recipeN: Float64Array): RecipeTest {
  const k = beta.length
  const L = recipeContrasts(recipeN)
  const C = s.inverse
  const VL = L.map((li) =>
    L.map((lj) => {
      let total = 0
      for (let x = 0; x < k; x++) {
        if (li[x] === 0) continue
        for (let y = 0; y < k; y++) total += li[x] * C[x * k + y] * lj[y]
      }
      return total * s.sigma2
    }),
  )
  const eig = symmetricEigen(VL)
  const tol = Math.max(Math.sqrt(Number.EPSILON) * eig.values[0], 0)
  const q = eig.values.filter((d) => d > tol).length
  if (q === 0) return emptyTest('no variance')
  let F = 0
  const nu: number[] = []
  for (let m = 0; m < q; m++) {
    const P = eig.vectors[m]
    const l = new Float64Array(k)
    for (let row = 0; row < L.length; row++) for (let x = 0; x < k; x++) l[x] += P[row] * L[row][x]
    let lb = 0
    for (let x = 0; x < k; x++) lb += l[x] * beta[x]
    F += (lb * lb) / eig.values[m]
    nu.push(s.contrast(l).df)
  }
  F /= q
  const denDf = fStatDdf(nu)
  if (!(denDf > 0 && Number.isFinite(denDf))) return emptyTest('no finite estimate')
  const x = (q * F) / (q * F + denDf)
  const p = betainc(x, q / 2, denDf / 2, true, true)
  return { f: F, numDf: q, denDf, p, reason: null }
}

/** lmerTest's rule for the F test's df from the per-eigenvector df. */
function fStatDdf(nu: number[]): number {
  if (nu.length === 1) return nu[0]
  if (nu.every((v, i) => i === 0 || Math.abs(v - nu[i - 1]) < 1e-8)) {
    return nu.reduce((a, b) => a + b, 0) / nu.length
  }
  if (nu.some((v) => v <= 2)) return 2
  const E = nu.reduce((a, v) => a + v / (v - 2), 0)
  return (2 * E) / (E - nu.length)
}

/**
 * Rows 2…k of the transposed unit lower Doolittle factor of XᵀX, X = [1, recipe dummies]
 * (treatment coding, first recipe the reference), mapped onto the recipe means.
 */
function recipeContrasts(recipeN: Float64Array): Float64Array[] {
  const k = recipeN.length
  const n = recipeN.reduce((a, b) => a + b, 0)
  const X = Array.from({ length: k }, (_, i) =>
    Array.from({ length: k }, (__, j) => {
      if (i === 0 && j === 0) return n
      if (i === 0) return recipeN[j]
      if (j === 0) return recipeN[i]
      return i === j ? recipeN[i] : 0
    }),
  )
  const Ld = doolittleLower(X)
  const rows: Float64Array[] = []
  for (let j = 1; j < k; j++) {
    // Row j of Lᵀ on (intercept, dummies); β_trt = (μ_1, μ_2 − μ_1, …) maps it to the means.
    const onTreatment = Array.from({ length: k }, (_, c) => Ld[c][j])
    const l = new Float64Array(k)
    for (let c = 1; c < k; c++) {
      l[c] = onTreatment[c]
      l[0] -= onTreatment[c]
    }
    l[0] += onTreatment[0]
    rows.push(l)
  }
  return rows
}

/** The Doolittle LU factor L of a square matrix, with lmerTest's clean-up of entries < 1e-6. */
function doolittleLower(x: number[][]): number[][] {
  const n = x.length
  const eps = 1e-6
  const L: number[][] = x.map((_, i) => x.map((__, j) => (i === j ? 1 : 0)))
  const U = x.map((row) => row.map(() => 0))
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let v = x[i][j]
      for (let p = 0; p < i; p++) v -= L[i][p] * U[p][j]
      U[i][j] = v
    }
    for (let j = i + 1; j < n; j++) {
      let v = x[j][i]
      for (let p = 0; p < i; p++) v -= L[j][p] * U[p][i]
      L[j][i] = Math.abs(U[i][i]) < eps ? 0 : v / U[i][i]
    }
  }
  for (const row of L) row.forEach((v, j) => (row[j] = Math.abs(v) < eps ? 0 : v))
  return L
}
