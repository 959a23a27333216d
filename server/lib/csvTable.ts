import { parse } from 'csv-parse/sync'
import { badRequest } from '../errors'

export interface CsvTableRules {
  /** What the file is called in messages: "file", "manifest". */
  what: string
  /** What one row is, for the empty-file message: "player", "file". */
  rowName: string
  columns: readonly string[]
  required: readonly string[]
  maxRows: number
}

/**
 * Reads an uploaded CSV with a header row: column names are normalised ("Consent date" →
 * consent_date), and a header with missing or unknown columns is refused as a whole, before any
 * row is looked at, with the expected columns in the message.
 */
export function readCsvTable(text: string, rules: CsvTableRules): Record<string, string>[] {
  let records: Record<string, string>[]
  try {
    records = parse(text, {
      columns: (header: string[]) => header.map((h) => h.trim().toLowerCase().replace(/\s+/g, '_')),
      bom: true,
      skip_empty_lines: true,
      trim: true,
      relax_column_count: false,
    })
  } catch (err) {
    throw badRequest(`The ${rules.what} is not a readable CSV: ${(err as Error).message}`)
  }
  if (records.length === 0)
    throw badRequest(`The ${rules.what} has no ${rules.rowName} rows under its header`)
  if (records.length > rules.maxRows)
    throw badRequest(`At most ${rules.maxRows} ${rules.rowName}s per ${rules.what}`)

  const header = Object.keys(records[0])
  const missing = rules.required.filter((c) => !header.includes(c))
  const unknown = header.filter((c) => !rules.columns.includes(c))
  if (missing.length || unknown.length) {
    const parts = []
    if (missing.length) parts.push(`missing column(s): ${missing.join(', ')}`)
    if (unknown.length) parts.push(`unknown column(s): ${unknown.join(', ')}`)
    throw badRequest(
      `The ${rules.what}'s header row does not fit: ${parts.join('; ')}. Expected: ${rules.columns.join(', ')}`,
    )
  }
  return records
}
