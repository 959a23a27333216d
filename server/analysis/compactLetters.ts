import type { Id } from './types.ts'

/*
 * A compact letter display: a letter string per item such that two items share a letter
 * exactly when the pair's test did not find them different. Built by the insert-and-absorb
 * algorithm (Piepho 2004, J. Comput. Graph. Stat. 13:456): start with one group holding every
 * item; for each pair found different, split every group holding both into one without each;
 * drop any group contained in another. Groups are lettered a, b, c… in the order of their
 * first item, so with items given highest mean first the top item always carries "a".
 */

export interface PairVerdict {
  a: Id
  b: Id
  /** The pair was found different at the session's α after its adjustment. */
  different: boolean
}

export function compactLetters(
  items: readonly Id[],
  pairs: readonly PairVerdict[],
): Map<Id, string> {
  const index = new Map(items.map((item, i) => [item, i]))
  let groups: Set<number>[] = [new Set(items.map((_, i) => i))]
  for (const pair of pairs) {
    if (!pair.different) continue
    const i = index.get(pair.a)
    const j = index.get(pair.b)
    if (i === undefined || j === undefined || i === j) continue
    const next: Set<number>[] = []
    for (const g of groups) {
      if (!(g.has(i) && g.has(j))) {
        next.push(g)
        continue
      }
      const withoutI = new Set(g)
      withoutI.delete(i)
      const withoutJ = new Set(g)
      withoutJ.delete(j)
      next.push(withoutI, withoutJ)
    }
    groups = absorb(next)
  }
  groups.sort((x, y) => first(x) - first(y))
  const letters = new Map<Id, string>(items.map((item) => [item, '']))
  groups.forEach((g, k) => {
    for (const i of [...g].sort((x, y) => x - y)) {
      letters.set(items[i], letters.get(items[i]) + letterName(k))
    }
  })
  return letters
}

/** Drops empty groups, duplicates and any group inside another: they add no information. */
function absorb(groups: Set<number>[]): Set<number>[] {
  const kept: Set<number>[] = []
  const bySize = groups.filter((g) => g.size > 0).sort((x, y) => y.size - x.size)
  for (const g of bySize) {
    if (kept.some((k) => [...g].every((i) => k.has(i)))) continue
    kept.push(g)
  }
  return kept
}

const first = (g: Set<number>) => Math.min(...g)

/** a…z, then aa, ab…: more than 26 groups needs more than 26 recipes' worth of splits. */
function letterName(k: number): string {
  const alphabet = 'abcdefghijklmnopqrstuvwxyz'
  return k < 26 ? alphabet[k] : letterName(Math.floor(k / 26) - 1) + alphabet[k % 26]
}
