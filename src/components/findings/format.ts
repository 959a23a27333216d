import type { Interval } from '@shared/schemas/findings'
import type { PAdjustment } from '@shared/schemas/sessions'

export const num = (x: number | null | undefined, digits = 1) =>
  x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(digits)

/** p-values as analysts read them: three decimals, and "< 0.001" below that. */
export const pValue = (p: number | null | undefined) =>
  p === null || p === undefined || !Number.isFinite(p) ? '—' : p < 0.001 ? '< 0.001' : p.toFixed(3)

/** The adjusted p's column names its adjustment: the session's design chose it. */
export const adjustedTitle = (adjustment: PAdjustment) => (adjustment === 'bh' ? 'BH p' : 'Holm p')

export const interval = (ci: Interval | null | undefined, digits = 1) =>
  ci ? `${num(ci.lower, digits)} to ${num(ci.upper, digits)}` : '—'

export const percent = (x: number | null | undefined) =>
  x === null || x === undefined ? '—' : `${Math.round(x * 100)}%`

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec']

/**
 * A moment as a printed report names it: "2 Dec 2026 14:03", in the reader's local time. The
 * month is spelled so that day and month cannot be swapped between countries.
 */
export function reportTime(iso: string): string {
  const d = new Date(iso)
  if (Number.isNaN(d.getTime())) return '—'
  const two = (n: number) => String(n).padStart(2, '0')
  return `${d.getDate()} ${MONTHS[d.getMonth()]} ${d.getFullYear()} ${two(d.getHours())}:${two(d.getMinutes())}`
}
