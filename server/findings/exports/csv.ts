import type { Interval, SessionFindings } from '../../../shared/schemas/findings'

/*
 * CSV for spreadsheets and R: RFC 4180 quoting, a header row, numbers at full precision and
 * empty cells for missing figures. Written here rather than with a library because the data
 * is small, flat and fully in memory.
 */

export type Cell = string | number | boolean | null | undefined

// A text cell that a spreadsheet would run as a formula is prefixed so it stays text.
const FORMULA_START = /^[=+\-@\t\r]/

function cell(value: Cell): string {
  if (value === null || value === undefined) return ''
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : ''
  if (typeof value === 'boolean') return value ? 'true' : 'false'
  const text = FORMULA_START.test(value) ? `'${value}` : value
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text
}

export function toCsv(header: readonly string[], rows: readonly (readonly Cell[])[]): string {
  return [header, ...rows].map((r) => r.map(cell).join(',')).join('\r\n') + '\r\n'
}

/** The adjustment's name as the tables print it, beside every adjusted p. */
export const adjustmentOf = (f: SessionFindings) =>
  f.session.adjustment === 'bh' ? 'Benjamini-Hochberg' : 'Holm'

export const lo = (ci: Interval | null) => ci?.lower ?? null
export const hi = (ci: Interval | null) => ci?.upper ?? null

/**
 * One findings table as an export: its header and a row per line. Rows spell recipes out with
 * `recipeName`, so a spreadsheet reads without a lookup.
 */
export interface ExportTable {
  header: readonly string[]
  rows(f: SessionFindings, recipeName: (id: number) => string): Cell[][]
}
