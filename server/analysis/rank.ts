export interface Ranking {
  /** Average ranks (1-based), in the order of the input. */
  ranks: Float64Array
  /** Σ (t³ − t) over groups of tied values: the usual tie correction term. */
  tieTerm: number
  /** Tie group sizes > 1. */
  ties: number[]
}

/** Average ranks, as R's rank() with ties.method = "average". */
export function rankAverage(values: ArrayLike<number>): Ranking {
  const n = values.length
  const order = new Uint32Array(n)
  for (let i = 0; i < n; i++) order[i] = i
  if (n <= 16) {
    // Insertion sort: a Friedman block is one player's handful of recipes, ranked thousands
    // of times per findings call, where a comparator-driven sort costs more than it saves.
    for (let i = 1; i < n; i++) {
      const item = order[i]
      let j = i - 1
      while (j >= 0 && values[order[j]] > values[item]) {
        order[j + 1] = order[j]
        j--
      }
      order[j + 1] = item
    }
  } else {
    order.sort((a, b) => values[a] - values[b])
  }
  const ranks = new Float64Array(n)
  const ties: number[] = []
  let tieTerm = 0
  let i = 0
  while (i < n) {
    let j = i + 1
    while (j < n && values[order[j]] === values[order[i]]) j++
    const rank = (i + j + 1) / 2
    for (let k = i; k < j; k++) ranks[order[k]] = rank
    const t = j - i
    if (t > 1) {
      ties.push(t)
      tieTerm += t * t * t - t
    }
    i = j
  }
  return { ranks, tieTerm, ties }
}
