/**
 * Holm's step-down adjustment (Holm 1979), as R's p.adjust(method = "holm"). Null entries (tests
 * that could not be run) are left null and do not count towards the family size, as R does
 * with NA.
 */
export function holm(pValues: ReadonlyArray<number | null>): (number | null)[] {
  const present: number[] = []
  for (let i = 0; i < pValues.length; i++) if (pValues[i] !== null) present.push(i)
  const m = present.length
  present.sort((a, b) => (pValues[a] as number) - (pValues[b] as number))
  const adjusted: (number | null)[] = pValues.map(() => null)
  let running = 0
  for (let rank = 0; rank < m; rank++) {
    const index = present[rank]
    // The running maximum keeps adjusted p-values in the same order as the raw ones.
    running = Math.max(running, Math.min(1, (m - rank) * (pValues[index] as number)))
    adjusted[index] = running
  }
  return adjusted
}
