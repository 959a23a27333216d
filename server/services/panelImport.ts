import { parse } from 'csv-parse/sync'
import type { AppContext } from '../context'
import { badRequest, validationFailed } from '../errors'
import { recordAudit, type Actor } from './audit'
import { insertPlayer } from './panel'
import { LIMITS } from '../../shared/constants'
import { PLAYER_CSV_COLUMNS, playerCsvRow, type CsvRowError } from '../../shared/schemas/players'
import { zodMessages } from '../middleware/validate'

const REQUIRED = ['name', 'email', 'instruments', 'level']

/**
 * Imports a panel CSV all or nothing: every row is checked first, and one bad row means no row
 * is stored. Row numbers are the file's line numbers, header = line 1, as a spreadsheet shows.
 */
export async function importPanelCsv(
  ctx: AppContext,
  text: string,
  actor: Actor,
): Promise<{ imported: number }> {
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
    throw badRequest(`The file is not a readable CSV: ${(err as Error).message}`)
  }
  if (records.length === 0) throw badRequest('The file has no player rows under its header')
  if (records.length > LIMITS.csvMaxRows)
    throw badRequest(`At most ${LIMITS.csvMaxRows} players per file`)

  const header = Object.keys(records[0])
  const missing = REQUIRED.filter((c) => !header.includes(c))
  const unknown = header.filter((c) => !(PLAYER_CSV_COLUMNS as readonly string[]).includes(c))
  if (missing.length || unknown.length) {
    const parts = []
    if (missing.length) parts.push(`missing column(s): ${missing.join(', ')}`)
    if (unknown.length) parts.push(`unknown column(s): ${unknown.join(', ')}`)
    throw badRequest(
      `The header row does not fit: ${parts.join('; ')}. Expected: ${PLAYER_CSV_COLUMNS.join(', ')}`,
    )
  }

  const rows: CsvRowError[] = []
  const valid: { line: number; data: ReturnType<typeof playerCsvRow.parse> }[] = []
  const seen = new Map<string, number>()
  records.forEach((record, i) => {
    const line = i + 2
    const result = playerCsvRow.safeParse(record)
    if (!result.success) {
      rows.push({ row: line, errors: zodMessages(result.error) })
      return
    }
    const first = seen.get(result.data.email)
    if (first) {
      rows.push({ row: line, errors: [`email: the same address is on line ${first}`] })
      return
    }
    seen.set(result.data.email, line)
    valid.push({ line, data: result.data })
  })

  const emails = [...seen.keys()]
  const taken = new Set<string>()
  for (let i = 0; i < emails.length; i += 500) {
    const found: { email: string }[] = await ctx
      .knex('players')
      .whereIn('email', emails.slice(i, i + 500))
      .select('email')
    for (const f of found) taken.add(f.email)
  }
  for (const v of valid) {
    if (taken.has(v.data.email)) rows.push({ row: v.line, errors: ['email: already on the panel'] })
  }
  if (rows.length) {
    rows.sort((a, b) => a.row - b.row)
    throw validationFailed(
      `${rows.length} of ${records.length} rows have problems; nothing was imported`,
      { rows },
    )
  }

  const now = ctx.clock.now().toISOString()
  await ctx.knex.transaction(async (trx) => {
    for (const { data } of valid) {
      await insertPlayer(trx, now, {
        name: data.name,
        email: data.email,
        instruments: data.instruments,
        level: data.level,
        region: data.region,
        consentDate: data.consent_date,
        notes: data.notes,
      })
    }
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'panel.imported',
      targetType: 'player',
      details: { count: valid.length },
    })
  })
  return { imported: valid.length }
}
