import type { Id, Rating } from './types.ts'

/** One attribute's player × recipe means: the player is the block. */
export interface AttributeTable {
  attribute: Id
  /** means[player][recipe]; null where the player gave no rating for that recipe. */
  means: (number | null)[][]
  /** How many ratings (clips, repeats) went into each mean. */
  counts: number[][]
}

export interface AggregatedRatings {
  players: Id[]
  recipes: Id[]
  attributes: Id[]
  tables: AttributeTable[]
  /** Ratings whose value was missing or not a finite number; they are left out. */
  ignored: number
}

/**
 * The same means as flat typed arrays (NaN where missing), for the hot loops inside the engine;
 * callers outside it get the null-filled tables.
 */
export interface DenseTables {
  players: Id[]
  recipes: Id[]
  attributes: Id[]
  /** dense[a][p * recipes.length + r] */
  dense: Float64Array[]
  counts: Uint32Array[]
  ignored: number
}

export interface AggregateOptions {
  /** Fixes the order and lets a recipe nobody rated still appear (with no data). */
  recipes?: readonly Id[]
  attributes?: readonly Id[]
}

function indexer(seed: readonly Id[] = []) {
  const list: Id[] = [...seed]
  const index = new Map<Id, number>(list.map((id, i) => [id, i]))
  return {
    list,
    get(id: Id): number {
      let i = index.get(id)
      if (i === undefined) {
        i = list.length
        list.push(id)
        index.set(id, i)
      }
      return i
    },
  }
}

/** Mean per player × recipe × attribute over clips and repeats, as typed arrays. */
export function aggregateDense(
  ratings: readonly Rating[],
  options: AggregateOptions = {},
): DenseTables {
  const players = indexer()
  const recipes = indexer(options.recipes)
  const attributes = indexer(options.attributes)
  // Indexes are resolved once per rating; the sums then live in flat typed arrays so that
  // 100k+ ratings pass without an allocation each.
  const at = new Int32Array(ratings.length * 3).fill(-1)
  let ignored = 0
  for (let i = 0; i < ratings.length; i++) {
    const r = ratings[i]
    if (typeof r.value !== 'number' || !Number.isFinite(r.value)) {
      ignored++
      continue
    }
    at[3 * i] = attributes.get(r.attribute)
    at[3 * i + 1] = players.get(r.player)
    at[3 * i + 2] = recipes.get(r.recipe)
  }
  const P = players.list.length
  const R = recipes.list.length
  const dense = attributes.list.map(() => new Float64Array(P * R))
  const counts = attributes.list.map(() => new Uint32Array(P * R))
  for (let i = 0; i < ratings.length; i++) {
    const a = at[3 * i]
    if (a < 0) continue
    const cell = at[3 * i + 1] * R + at[3 * i + 2]
    dense[a][cell] += ratings[i].value
    counts[a][cell]++
  }
  dense.forEach((sums, a) => {
    for (let cell = 0; cell < sums.length; cell++) {
      sums[cell] = counts[a][cell] > 0 ? sums[cell] / counts[a][cell] : Number.NaN
    }
  })
  return {
    players: players.list,
    recipes: recipes.list,
    attributes: attributes.list,
    dense,
    counts,
    ignored,
  }
}

/** Mean per player × recipe × attribute over clips and repeats. */
export function aggregateRatings(
  ratings: readonly Rating[],
  options: AggregateOptions = {},
): AggregatedRatings {
  const d = aggregateDense(ratings, options)
  const P = d.players.length
  const R = d.recipes.length
  const tables: AttributeTable[] = d.attributes.map((attribute, a) => {
    const means: (number | null)[][] = []
    const counts: number[][] = []
    for (let p = 0; p < P; p++) {
      const row: (number | null)[] = new Array(R)
      const countRow: number[] = new Array(R)
      for (let r = 0; r < R; r++) {
        const v = d.dense[a][p * R + r]
        row[r] = Number.isNaN(v) ? null : v
        countRow[r] = d.counts[a][p * R + r]
      }
      means.push(row)
      counts.push(countRow)
    }
    return { attribute, means, counts }
  })
  return {
    players: d.players,
    recipes: d.recipes,
    attributes: d.attributes,
    tables,
    ignored: d.ignored,
  }
}

/** Players who rated anything on this attribute: the panel a pair's dropouts are counted from. */
function activeRows(table: AttributeTable): number[] {
  const rows: number[] = []
  table.means.forEach((row, p) => {
    if (row.some((v) => v !== null)) rows.push(p)
  })
  return rows
}

export interface CompleteCases {
  /** Row indexes (into the players list) of players with every requested recipe rated. */
  players: number[]
  /** values[i][c]: player players[i], requested recipe c. */
  values: number[][]
  /** Players who rated this attribute but miss at least one requested recipe. */
  dropped: number
}

/** Complete cases over the given recipe columns (two for a pair, all for the omnibus). */
export function completeCases(table: AttributeTable, columns: readonly number[]): CompleteCases {
  const players: number[] = []
  const values: number[][] = []
  const active = activeRows(table)
  for (const p of active) {
    const row = table.means[p]
    const picked = columns.map((c) => row[c])
    if (picked.every((v) => v !== null)) {
      players.push(p)
      values.push(picked as number[])
    }
  }
  return { players, values, dropped: active.length - players.length }
}

/** Each recipe's player means (players who rated it), for per-recipe summaries. */
export function recipeColumn(table: AttributeTable, column: number): number[] {
  const out: number[] = []
  for (const row of table.means) {
    const v = row[column]
    if (v !== null) out.push(v)
  }
  return out
}
