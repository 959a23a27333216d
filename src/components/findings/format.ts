import type { Interval } from '@shared/schemas/findings'

export const num = (x: number | null | undefined, digits = 1) =>
  x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(digits)

/** p-values as analysts read them: three decimals, and "< 0.001" below that. */
export const pValue = (p: number | null | undefined) =>
  p === null || p === undefined || !Number.isFinite(p) ? '—' : p < 0.001 ? '< 0.001' : p.toFixed(3)

export const interval = (ci: Interval | null | undefined, digits = 1) =>
  ci ? `${num(ci.lower, digits)} to ${num(ci.upper, digits)}` : '—'

export const percent = (x: number | null | undefined) =>
  x === null || x === undefined ? '—' : `${Math.round(x * 100)}%`
