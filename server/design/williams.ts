import { createRandom, deriveSeed, shuffle, type Seed } from './random.ts'
import { DesignError } from './errors.ts'

/**
 * Rows of a Williams design for n treatments (0…n−1): each treatment once in every position
 * of every row block, and each ordered pair of different treatments adjacent equally often
 * (once over n rows for even n, twice over 2n rows for odd n). Ratings drift with what was
 * heard just before, so the carry-over has to be spread evenly, not only the positions.
 */
export function williamsSquare(n: number): number[][] {
  if (!Number.isInteger(n) || n < 1) {
    throw new DesignError(`A Williams design needs a whole number of treatments, got ${n}`)
  }
  if (n === 1) return [[0]]
  // 0, 1, n−1, 2, n−2, …: for even n the steps between neighbours (1, −2, 3, −4, …) hit every
  // non-zero residue once, so adding i to every entry moves each ordered pair to a new row.
  const first = [0]
  for (let lo = 1, hi = n - 1; first.length < n;) {
    first.push(first.length % 2 === 1 ? lo++ : hi--)
  }
  const rows = Array.from({ length: n }, (_, i) => first.map((t) => (t + i) % n))
  if (n % 2 === 0) return rows
  // For odd n some steps repeat and others are missing; the mirrored rows supply the negated
  // steps, which makes every pair appear exactly twice.
  return [...rows, ...rows.map((row) => [...row].reverse())]
}

/** Rows in one complete block: where position and carry-over balance are exact. */
export function williamsRowCount(n: number): number {
  return n <= 1 ? 1 : n % 2 === 0 ? n : 2 * n
}

/**
 * One row of the design, with the items relabelled by a permutation drawn from the seed so
 * that two sessions with the same recipes do not open with the same recipe for player 0.
 * Rows are dealt in order, not shuffled: the first n rows of an odd design are already a Latin
 * square, so a panel that stops half-way through the block keeps position balance.
 */
export function williamsOrder<T>(items: readonly T[], rowIndex: number, seed: Seed): T[] {
  if (items.length === 0) return []
  if (!Number.isInteger(rowIndex) || rowIndex < 0) {
    throw new DesignError(`A row index must be a whole number from 0, got ${rowIndex}`)
  }
  const square = williamsSquare(items.length)
  const labels = shuffle(items, createRandom(deriveSeed(seed, 'williams')))
  const row = square[rowIndex % square.length]
  return row.map((t) => labels[t])
}

/** The orders of players 0…players−1: player i gets row i mod rows. */
export function williamsOrders<T>(items: readonly T[], players: number, seed: Seed): T[][] {
  if (!Number.isInteger(players) || players < 0) {
    throw new DesignError(`The number of players must be a whole number, got ${players}`)
  }
  return Array.from({ length: players }, (_, i) => williamsOrder(items, i, seed))
}
