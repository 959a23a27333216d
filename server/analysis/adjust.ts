import { benjaminiHochberg } from './benjaminiHochberg.ts'
import { holm } from './holm.ts'

/**
 * How a family of p-values is adjusted for being many: Holm keeps the chance of any false
 * "clear difference" at α (family-wise); Benjamini–Hochberg keeps the expected share of false
 * ones among those called clear at α (false discovery rate), which loses less power when a
 * session compares many recipes. The session's designer chooses before anyone answers.
 */
export type Adjustment = 'holm' | 'bh'

export const ADJUSTMENTS: readonly Adjustment[] = ['holm', 'bh']

/** The short name tables and sentences use: "Holm p", "BH p". */
export const ADJUSTMENT_LABEL: Record<Adjustment, string> = { holm: 'Holm', bh: 'BH' }

/** Nulls (tests that could not be run) stay null and do not count in the family, as R's NA. */
export function adjustP(
  pValues: ReadonlyArray<number | null>,
  adjustment: Adjustment = 'holm',
): (number | null)[] {
  return adjustment === 'bh' ? benjaminiHochberg(pValues) : holm(pValues)
}
