/**
 * Benjamini–Hochberg step-up adjustment (Benjamini & Hochberg 1995), as R's
 * p.adjust(method = "BH"). Null entries (tests that could not be run) are left null and do not
 * count towards the family size, as R does with NA.
 */
export function benjaminiHochberg(pValues: ReadonlyArray<number | null>): (number | null)[] {
  const present: number[] = []
  for (let i = 0; i < pValues.length; i++) if (pValues[i] !== null) present.push(i)
  const m = present.length
  // Largest p first: the running minimum keeps adjusted p-values in the raw ones' order.
  present.sort((a, b) => (pValues[b] as number) - (pValues[a] as number))
  const adjusted: (number | null)[] = pValues.map(() => null)
  let running = 1
  for (let k = 0; k < m; k++) {
    const index = present[k]
    const rank = m - k
    running = Math.min(running, (m / rank) * (pValues[index] as number))
    adjusted[index] = running
  }
  return adjusted
}
