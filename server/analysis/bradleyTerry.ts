import type { Id, Reason } from './types.ts'

export interface BradleyTerryAbility {
  item: Id
  /** log ability relative to the reference item (0 for the reference); null when no fit. */
  logAbility: number | null
  /** Standard error of logAbility with the reference fixed; 0 for the reference. */
  se: number | null
  wins: number
  comparisons: number
}

export interface BradleyTerryResult {
  items: Id[]
  reference: Id | null
  abilities: BradleyTerryAbility[]
  /** winProbability[i][j]: modelled chance that item i is preferred over item j; null when no fit. */
  winProbability: number[][] | null
  iterations: number
  converged: boolean
  reason: Reason
}

export interface BradleyTerryOptions {
  /** Index of the item whose log ability is fixed at 0 (default 0). */
  reference?: number
  tolerance?: number
  maxIterations?: number
}

export interface PairChoice {
  winner: Id
  loser: Id
}

/** Winner × loser count matrix from individual choices, in the order of `items`. */
export function winsMatrix(choices: readonly PairChoice[], items: readonly Id[]): number[][] {
  const index = new Map(items.map((item, i) => [item, i]))
  const wins = items.map(() => new Array<number>(items.length).fill(0))
  for (const { winner, loser } of choices) {
    const i = index.get(winner)
    const j = index.get(loser)
    if (i !== undefined && j !== undefined && i !== j) wins[i][j]++
  }
  return wins
}

/** A square matrix of whole, non-negative counts, one row and column per item. */
function checkWins(wins: readonly (readonly number[])[], k: number): void {
  if (wins.length !== k || wins.some((row) => row.length !== k)) {
    throw new RangeError('bradleyTerry: wins must be a square matrix with one row per item')
  }
  for (const row of wins) {
    for (const w of row) {
      if (!Number.isInteger(w) || w < 0) {
        throw new RangeError('bradleyTerry: wins must be whole numbers ≥ 0')
      }
    }
  }
}

/**
 * A finite maximum-likelihood estimate exists only when every item can be reached from every
 * other along "beat" edges (Hunter 2004, Assumption 1); otherwise some ability runs off to ±∞.
 */
function stronglyConnected(wins: number[][]): boolean {
  const k = wins.length
  const reach = (forward: boolean) => {
    const seen = new Array<boolean>(k).fill(false)
    const stack = [0]
    seen[0] = true
    while (stack.length) {
      const i = stack.pop() as number
      for (let j = 0; j < k; j++) {
        const edge = forward ? wins[i][j] : wins[j][i]
        if (!seen[j] && edge > 0) {
          seen[j] = true
          stack.push(j)
        }
      }
    }
    return seen.every(Boolean)
  }
  return reach(true) && reach(false)
}

/**
 * Bradley–Terry abilities by Hunter's (2004) MM algorithm, with standard errors from the
 * observed information of the log abilities with the reference held at 0.
 */
export function bradleyTerry(
  items: readonly Id[],
  wins: number[][],
  options: BradleyTerryOptions = {},
): BradleyTerryResult {
  const { reference = 0, tolerance = 1e-10, maxIterations = 100_000 } = options
  const k = items.length
  checkWins(wins, k)
  if (k > 0 && !(Number.isInteger(reference) && reference >= 0 && reference < k)) {
    throw new RangeError('bradleyTerry: reference must index one of the items')
  }
  const totalWins = wins.map((row) => row.reduce((a, b) => a + b, 0))
  const comparisons = items.map((_, i) =>
    wins[i].reduce((sum, w, j) => sum + w + (wins[j]?.[i] ?? 0), 0),
  )
  const failed = (reason: Reason): BradleyTerryResult => ({
    items: [...items],
    reference: items[reference] ?? null,
    // No placeholder numbers: a scale that could not be fitted says why and shows nothing.
    abilities: items.map((item, i) => ({
      item,
      logAbility: null,
      se: null,
      wins: totalWins[i],
      comparisons: comparisons[i],
    })),
    winProbability: null,
    iterations: 0,
    converged: false,
    reason,
  })
  if (k < 2) return failed('fewer than two recipes')
  if (comparisons.some((c) => c === 0)) return failed('a recipe was never compared')
  if (!stronglyConnected(wins)) return failed('some recipes won every comparison with the rest')

  let gamma = new Float64Array(k).fill(1)
  let iterations = 0
  let converged = false
  while (iterations < maxIterations && !converged) {
    iterations++
    const next = new Float64Array(k)
    for (let i = 0; i < k; i++) {
      let denominator = 0
      for (let j = 0; j < k; j++) {
        if (j === i) continue
        const nij = wins[i][j] + wins[j][i]
        if (nij > 0) denominator += nij / (gamma[i] + gamma[j])
      }
      next[i] = totalWins[i] / denominator
    }
    // Only ratios matter; rescaling to the reference keeps the numbers in range.
    const scale = next[reference]
    let change = 0
    for (let i = 0; i < k; i++) {
      next[i] /= scale
      change = Math.max(change, Math.abs(Math.log(next[i] / gamma[i])))
    }
    gamma = next
    converged = change < tolerance
  }
  if (!converged) return { ...failed('did not converge'), iterations }

  const lambda = Array.from(gamma, Math.log)
  const winProbability = lambda.map((li) => lambda.map((lj) => 1 / (1 + Math.exp(lj - li))))
  const se = standardErrors(wins, winProbability, reference)
  return {
    items: [...items],
    reference: items[reference],
    abilities: items.map((item, i) => ({
      item,
      logAbility: lambda[i],
      se: se[i],
      wins: totalWins[i],
      comparisons: comparisons[i],
    })),
    winProbability,
    iterations,
    converged,
    reason: null,
  }
}

function standardErrors(wins: number[][], prob: number[][], reference: number): number[] {
  const k = wins.length
  const free = [...Array(k).keys()].filter((i) => i !== reference)
  const m = free.length
  // Observed information of the log-likelihood in λ: Σ n_ij p_ij p_ji on the diagonal.
  const info = free.map((i) =>
    free.map((j) => {
      if (i !== j) return -(wins[i][j] + wins[j][i]) * prob[i][j] * prob[j][i]
      let sum = 0
      for (let l = 0; l < k; l++) {
        if (l !== i) sum += (wins[i][l] + wins[l][i]) * prob[i][l] * prob[l][i]
      }
      return sum
    }),
  )
  const inverse = invertSymmetric(info)
  const se = new Array<number>(k).fill(0)
  for (let a = 0; a < m; a++) se[free[a]] = Math.sqrt(Math.max(0, inverse[a][a]))
  return se
}

/** Gauss–Jordan with partial pivoting; the matrices here are (recipes − 1) square. */
function invertSymmetric(matrix: number[][]): number[][] {
  const m = matrix.length
  const a = matrix.map((row, i) => [...row, ...row.map((_, j) => (i === j ? 1 : 0))])
  for (let col = 0; col < m; col++) {
    let pivot = col
    for (let r = col + 1; r < m; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivot][col])) pivot = r
    ;[a[col], a[pivot]] = [a[pivot], a[col]]
    const p = a[col][col]
    for (let c = 0; c < 2 * m; c++) a[col][c] /= p
    for (let r = 0; r < m; r++) {
      if (r === col) continue
      const f = a[r][col]
      if (f !== 0) for (let c = 0; c < 2 * m; c++) a[r][c] -= f * a[col][c]
    }
  }
  return a.map((row) => row.slice(m))
}
