import type { Interval } from './types.ts'

const MINUS = '\u2212'

/** Fixed decimals with a true minus sign, and never "−0.0". */
export function formatNumber(x: number, decimals = 1): string {
  const text = Math.abs(x).toFixed(decimals)
  const isZero = Number(text) === 0
  return x < 0 && !isZero ? MINUS + text : text
}

/** p as people read it: three decimals below 0.1, two above, and a floor at 0.001. */
export function formatP(p: number): string {
  if (p < 0.001) return '< 0.001'
  return '= ' + (p < 0.1 ? p.toFixed(3) : p.toFixed(2))
}

export function formatInterval(ci: Interval, decimals = 1): string {
  return `${formatNumber(ci.lower, decimals)} to ${formatNumber(ci.upper, decimals)}`
}
