import jstatPkg from 'jstat'
import tCdf from '@stdlib/stats-base-dists-t-cdf'
import tQuantile from '@stdlib/stats-base-dists-t-quantile'
import betainc from '@stdlib/math-base-special-betainc'
import {
  deviance,
  gls,
  minimise,
  profiledDeviance,
  sigma2At,
  solve,
  type CellData,
  type CellPattern,
} from './linearMixedFit.ts'
import type { Id, Interval, Reason } from './types.ts'

const { jStat } = jstatPkg

// The mixed model of one attribute: every rating counts, a player who skipped a recipe still
// informs the rest (ISO 13299 analyses profiling data with assessors as a random factor). The
// inference is lmerTest's and emmeans' with Satterthwaite's degrees of freedom.

export interface MixedModelRating {
  player: Id
  recipe: Id
  value: number
}

export interface MixedMean {
  recipe: Id
  estimate: number | null
  se: number | null
  df: number | null
  ci: Interval | null
}

export interface MixedContrast {
  first: Id
  second: Id
  /** second − first, as the pair table. */
  estimate: number
  se: number
  df: number
  t: number
  /** Tukey-adjusted over the recipes' pairs (studentized range), and unadjusted. */
  p: number
  pUnadjusted: number
}

export interface MixedModelResult {
  formula: string
  n: number
  players: number
  variance: { player: number; playerRecipe: number | null; residual: number } | null
  /** lme4's REML criterion. */
  reml: number | null
  /**
   * A variance component sits at 0 (lme4 calls the fit singular): the model then treats
   * repeats as independent evidence, and its p-values deserve less trust than the paired table.
   */
  singular: boolean
  test: { f: number; numDf: number; denDf: number; p: number } | null
  means: MixedMean[]
  contrasts: MixedContrast[]
  reason: Reason
}

/** rating ~ recipe + (1 | player) [+ (1 | player:recipe) with repeats], by REML. */
export function mixedModel(
  ratings: readonly MixedModelRating[],
  recipes: readonly Id[],
  options: { level?: number } = {},
): MixedModelResult {
  const level = options.level ?? 0.95
  for (const r of ratings) {
    if (!Number.isFinite(r.value))
      throw new RangeError('mixedModel: ratings must be finite numbers')
  }
  const recipeIndex = new Map(recipes.map((id, i) => [String(id), i]))
  const rated = new Set<number>()
  for (const r of ratings) {
    const j = recipeIndex.get(String(r.recipe))
    if (j !== undefined) rated.add(j)
  }
  // Recipes nobody rated have no mean to estimate; the model runs over the rest.
  const columns = [...rated].sort((a, b) => a - b)
  const column = new Map(columns.map((j, c) => [j, c]))
  const data = cellData(ratings, recipeIndex, column)
  const formula = data.repeated
    ? 'rating ~ recipe + (1 | player) + (1 | player:recipe)'
    : 'rating ~ recipe + (1 | player)'
  const empty = (reason: Reason): MixedModelResult => ({
    formula,
    n: data.n,
    players: data.players,
    variance: null,
    reml: null,
    singular: false,
    test: null,
    means: recipes.map((recipe) => ({ recipe, estimate: null, se: null, df: null, ci: null })),
    contrasts: [],
    reason,
  })
  if (data.players === 0) return empty('nobody rated this attribute')
  if (data.players < 2) return empty('only one player rated it')
  if (data.k < 2) return empty('fewer than two recipes')
  if (data.n - data.k < 2) return empty('no variance')

  // REML over the variance ratios (t² each), σ² profiled out.
  const start = data.repeated ? [0.5, 0.5] : [0.5]
  const t = minimise(
    (x) => profiledDeviance(data, x[0] * x[0], data.repeated ? x[1] * x[1] : 0),
    start,
  )
  const rhoU = t[0] * t[0]
  const rhoV = data.repeated ? t[1] * t[1] : 0
  const s2 = sigma2At(data, rhoU, rhoV)
  if (!(s2 > 1e-12)) return empty('no variance')
  const sigma = Math.sqrt(s2)
  const fit = gls(data, rhoU, rhoV)
  const reml = profiledDeviance(data, rhoU, rhoV)

  // Satterthwaite: parameters as lmerTest's (θ…, σ); A = 2·H⁻¹ of the REML criterion.
  const phi = data.repeated ? [t[0], t[1], sigma] : [t[0], sigma]
  const devAt = (x: number[]) =>
    data.repeated ? deviance(data, x[0], x[1], x[2]) : deviance(data, x[0], 0, x[1])
  const vcovAt = (x: number[]) => {
    const g = data.repeated ? gls(data, x[0] * x[0], x[1] * x[1]) : gls(data, x[0] * x[0], 0)
    const sc = x[x.length - 1] ** 2
    // A singular system near the optimum leaves NaN, which the soundness check turns away.
    if (!g.ok) return Array.from({ length: data.k }, () => new Array<number>(data.k).fill(NaN))
    return g.inverse.map((row) => Array.from(row, (v) => v * sc))
  }
  const H = hessian(devAt, phi)
  const A = inverseOf(H)?.map((row) => row.map((v) => 2 * v)) ?? null
  const jac = phi.map((_, i) => derivative((x) => vcovAt(x), phi, i))
  const vcov = vcovAt(phi)
  const satterthwaite = (L: number[]): { variance: number; df: number } => {
    const variance = quadForm(L, vcov)
    if (!A) return { variance, df: NaN }
    const g = jac.map((J) => quadForm(L, J))
    let gAg = 0
    for (let i = 0; i < g.length; i++)
      for (let j = 0; j < g.length; j++) gAg += g[i] * A[i][j] * g[j]
    return { variance, df: (2 * variance * variance) / gAg }
  }

  const k = data.k
  const unit = (c: number) => Array.from({ length: k }, (_, i) => (i === c ? 1 : 0))
  const means: MixedMean[] = recipes.map((recipe, j) => {
    const c = column.get(j)
    if (c === undefined) return { recipe, estimate: null, se: null, df: null, ci: null }
    const { variance, df } = satterthwaite(unit(c))
    const se = Math.sqrt(variance)
    const half = tQuantile(1 - (1 - level) / 2, df) * se
    const estimate = fit.beta[c]
    return { recipe, estimate, se, df, ci: { lower: estimate - half, upper: estimate + half } }
  })

  const contrasts: MixedContrast[] = []
  for (let a = 0; a < k; a++)
    for (let b = a + 1; b < k; b++) {
      const L = unit(b).map((v, i) => v - unit(a)[i])
      const { variance, df } = satterthwaite(L)
      const se = Math.sqrt(variance)
      const estimate = fit.beta[b] - fit.beta[a]
      const tValue = estimate / se
      contrasts.push({
        first: recipes[columns[a]],
        second: recipes[columns[b]],
        estimate,
        se,
        df,
        t: tValue,
        p: k === 2 ? twoSided(tValue, df) : tukeyUpper(Math.abs(tValue) * Math.SQRT2, k, df),
        pUnadjusted: twoSided(tValue, df),
      })
    }

  // The recipe F test as lmerTest's type III. For one factor its contrasts are the rows of the
  // Doolittle (LU) reduction of XᵀX in treatment coding, each scaled to a unit diagonal: they
  // depend on how many ratings each recipe has, and with Satterthwaite's df per eigenvector of
  // L·V·Lᵀ the basis matters, so it is the same basis.
  const Ls = typeThreeContrasts(data.recipeCounts)
  const test = fTest(Ls, fit.beta, vcov, satterthwaite)

  // Too little data for the variance parameters' own spread (a flat or singular likelihood):
  // the degrees of freedom, and everything built on them, would be made up.
  const finite = (x: number | null | undefined) => typeof x === 'number' && Number.isFinite(x)
  const sound =
    means.every((m) => m.estimate === null || (finite(m.df) && (m.df as number) > 0)) &&
    contrasts.every((c) => finite(c.df) && c.df > 0 && finite(c.p)) &&
    (test === null || (finite(test.denDf) && test.denDf > 0 && finite(test.p)))
  if (!sound) return empty('no finite estimate')
  return {
    formula,
    n: data.n,
    players: data.players,
    variance: { player: rhoU * s2, playerRecipe: data.repeated ? rhoV * s2 : null, residual: s2 },
    reml,
    singular: rhoU < 1e-8 || (data.repeated && rhoV < 1e-8),
    test,
    means,
    contrasts,
    reason: null,
  }
}

function cellData(
  ratings: readonly MixedModelRating[],
  recipeIndex: Map<string, number>,
  column: Map<number, number>,
): CellData {
  // Players by first appearance, cells in flat arrays over player × recipe.
  const k = column.size
  const playerOf = new Map<string, number>()
  const rowPlayer = new Int32Array(ratings.length)
  const rowCell = new Int32Array(ratings.length).fill(-1)
  for (let i = 0; i < ratings.length; i++) {
    const j = recipeIndex.get(String(ratings[i].recipe))
    if (j === undefined) continue
    const key = String(ratings[i].player)
    let p = playerOf.get(key)
    if (p === undefined) playerOf.set(key, (p = playerOf.size))
    rowPlayer[i] = p
    rowCell[i] = column.get(j) as number
  }
  const P = playerOf.size
  const sums = new Float64Array(P * k)
  const counts = new Int32Array(P * k)
  let n = 0
  for (let i = 0; i < ratings.length; i++) {
    if (rowCell[i] < 0) continue
    const cell = rowPlayer[i] * k + rowCell[i]
    sums[cell] += ratings[i].value
    counts[cell]++
    n++
  }
  // Second pass for Σ(y − ȳ)², exact rather than from sums of squares.
  let within = 0
  for (let i = 0; i < ratings.length; i++) {
    if (rowCell[i] < 0) continue
    const cell = rowPlayer[i] * k + rowCell[i]
    within += (ratings[i].value - sums[cell] / counts[cell]) ** 2
  }
  const byPlayer = Array.from({ length: P }, (_, p) => {
    const entries: [number, { sum: number; count: number }][] = []
    for (let c = 0; c < k; c++) {
      const cell = p * k + c
      if (counts[cell] > 0) entries.push([c, { sum: sums[cell], count: counts[cell] }])
    }
    return entries
  })
  let cellCount = 0
  let logCounts = 0
  let repeated = false
  let widest = 1
  let maxCount = 1
  const patterns = new Map<string, CellPattern>()
  for (const entries of byPlayer) {
    cellCount += entries.length
    widest = Math.max(widest, entries.length)
    for (const [, cell] of entries) {
      logCounts += Math.log(cell.count)
      if (cell.count > 1) repeated = true
      maxCount = Math.max(maxCount, cell.count)
    }
    const key = entries.map(([c, cell]) => `${c}:${cell.count}`).join(',')
    const size = entries.length
    let pattern = patterns.get(key)
    if (!pattern) {
      pattern = {
        recipe: Int32Array.from(entries.map(([c]) => c)),
        count: Int32Array.from(entries.map(([, cell]) => cell.count)),
        players: 0,
        sum: new Float64Array(size),
        sumSq: new Float64Array(size),
        scatter: new Float64Array(size * size),
      }
      patterns.set(key, pattern)
    }
    pattern.players++
    const means = entries.map(([, cell]) => cell.sum / cell.count)
    for (let j = 0; j < size; j++) {
      pattern.sum[j] += means[j]
      pattern.sumSq[j] += means[j] * means[j]
      for (let l = 0; l < size; l++) pattern.scatter[j * size + l] += means[j] * means[l]
    }
  }
  const recipeCounts = new Array<number>(k).fill(0)
  for (let p = 0; p < P; p++) for (let c = 0; c < k; c++) recipeCounts[c] += counts[p * k + c]
  return {
    k: column.size,
    recipeCounts,
    patterns: [...patterns.values()],
    players: P,
    n,
    cells: cellCount,
    within,
    logCounts,
    repeated,
    widest,
    maxCount,
  }
}

function fTest(
  Ls: number[][],
  beta: Float64Array,
  vcov: number[][],
  satterthwaite: (L: number[]) => { variance: number; df: number },
): MixedModelResult['test'] {
  const q = Ls.length
  if (q === 0) return null
  const V = Ls.map((a) => Ls.map((b) => bilinear(a, vcov, b)))
  const { values, vectors } = jacobiEigen(V)
  let sum = 0
  const nus: number[] = []
  for (let m = 0; m < q; m++) {
    const row = Ls[0].map((_, i) => Ls.reduce((s, L, r) => s + vectors[r][m] * L[i], 0))
    const estimate = row.reduce((s, v, i) => s + v * beta[i], 0)
    sum += (estimate * estimate) / values[m]
    nus.push(satterthwaite(row).df)
  }
  const f = sum / q
  let denDf: number
  if (q === 1) denDf = nus[0]
  else if (nus.every((nu) => Math.abs(nu - nus[0]) < 1e-8)) denDf = nus.reduce((a, b) => a + b) / q
  else if (nus.some((nu) => nu <= 2)) denDf = 2
  else {
    const E = nus.reduce((s, nu) => s + nu / (nu - 2), 0)
    denDf = (2 * E) / (E - q)
  }
  // Upper tail of F(q, ν) as a regularized incomplete beta, not 1 − cdf.
  const p = betainc(denDf / (denDf + q * f), denDf / 2, q / 2)
  return { f, numDf: q, denDf, p }
}

const twoSided = (t: number, df: number) => Math.min(1, 2 * tCdf(-Math.abs(t), df))

function tukeyUpper(q: number, k: number, df: number): number {
  return Math.max(0, 1 - jStat.tukey.cdf(q, k, df))
}

function quadForm(L: number[], M: number[][]): number {
  return bilinear(L, M, L)
}

function bilinear(a: number[], M: number[][], b: number[]): number {
  let s = 0
  for (let i = 0; i < a.length; i++) {
    if (a[i] === 0) continue
    for (let j = 0; j < b.length; j++) s += a[i] * M[i][j] * b[j]
  }
  return s
}

const stepFor = (x: number) => 1e-3 * Math.max(Math.abs(x), 0.1)

/** ∂f/∂x_i by central differences with one Richardson step (error O(h⁴)). */
function derivative(f: (x: number[]) => number[][], x: number[], i: number): number[][] {
  const h = stepFor(x[i])
  const central = (step: number) => {
    const up = f(x.map((v, j) => (j === i ? v + step : v)))
    const down = f(x.map((v, j) => (j === i ? v - step : v)))
    return up.map((row, r) => row.map((v, c) => (v - down[r][c]) / (2 * step)))
  }
  const coarse = central(h)
  const fine = central(h / 2)
  return fine.map((row, r) => row.map((v, c) => (4 * v - coarse[r][c]) / 3))
}

/** Hessian by central second differences with one Richardson step. */
function hessian(f: (x: number[]) => number, x: number[]): number[][] {
  const n = x.length
  const at = (d: number[]) => f(x.map((v, i) => v + d[i]))
  const f0 = f(x)
  const second = (i: number, j: number, hi: number, hj: number) => {
    const e = (si: number, sj: number) =>
      x.map((_, q) => (q === i ? si * hi : 0) + (q === j ? sj * hj : 0))
    if (i === j) return (at(e(1, 0)) - 2 * f0 + at(e(-1, 0))) / (hi * hi)
    return (at(e(1, 1)) - at(e(1, -1)) - at(e(-1, 1)) + at(e(-1, -1))) / (4 * hi * hj)
  }
  const H = Array.from({ length: n }, () => new Array<number>(n).fill(0))
  for (let i = 0; i < n; i++)
    for (let j = i; j < n; j++) {
      const hi = stepFor(x[i]) * 10
      const hj = stepFor(x[j]) * 10
      const coarse = second(i, j, hi, hj)
      const fine = second(i, j, hi / 2, hj / 2)
      H[i][j] = H[j][i] = (4 * fine - coarse) / 3
    }
  return H
}

function inverseOf(a: number[][]): number[][] | null {
  const n = a.length
  const columns: number[][] = []
  for (let c = 0; c < n; c++) {
    const col = solve(
      a,
      a.map((_, r) => (r === c ? 1 : 0)),
    )
    if (!col) return null
    columns.push(col)
  }
  return a.map((_, r) => columns.map((col) => col[r]))
}

/** Eigen-decomposition of a small symmetric matrix (cyclic Jacobi); vectors in columns. */
function jacobiEigen(input: number[][]): { values: number[]; vectors: number[][] } {
  const n = input.length
  const a = input.map((row) => [...row])
  const v: number[][] = a.map((_, i) => a.map((_, j) => (i === j ? 1 : 0)))
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) off += a[i][j] * a[i][j]
    if (off < 1e-30) break
    for (let p = 0; p < n; p++)
      for (let q = p + 1; q < n; q++) {
        if (Math.abs(a[p][q]) < 1e-300) continue
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
  return { values: a.map((row, i) => row[i]), vectors: v }
}

/**
 * Type III contrasts of a one-way layout in cell-means coding, from the counts per recipe:
 * Doolittle-reduce XᵀX of the treatment coding (intercept = first recipe, then one column per
 * other recipe), scale each row to a unit diagonal, keep the recipe rows, and carry them from
 * coefficients (μ₁, μⱼ − μ₁) to means.
 */
function typeThreeContrasts(counts: readonly number[]): number[][] {
  const k = counts.length
  const total = counts.reduce((a, b) => a + b, 0)
  const xtx = Array.from({ length: k }, (_, i) =>
    Array.from({ length: k }, (_, j) => {
      if (i === 0 && j === 0) return total
      if (i === 0) return counts[j]
      if (j === 0) return counts[i]
      return i === j ? counts[i] : 0
    }),
  )
  // Gaussian elimination without pivoting: U of the LU decomposition.
  const U = xtx.map((row) => [...row])
  for (let c = 0; c < k; c++)
    for (let r = c + 1; r < k; r++) {
      const f = U[r][c] / U[c][c]
      for (let j = c; j < k; j++) U[r][j] -= f * U[c][j]
    }
  const rows = U.slice(1).map((row, i) => row.map((v) => v / U[i + 1][i + 1]))
  // Coefficient c₀ = μ₁, cⱼ = μⱼ − μ₁: a row l over coefficients is l₀μ₁ + Σ lⱼ(μⱼ − μ₁).
  return rows.map((l) => {
    const out = new Array<number>(k).fill(0)
    out[0] = l[0]
    for (let j = 1; j < k; j++) {
      out[j] += l[j]
      out[0] -= l[j]
    }
    return out
  })
}
