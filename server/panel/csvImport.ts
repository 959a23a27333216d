import type { AppContext } from '../context'
import { validationFailed } from '../errors'
import { readCsvTable } from '../lib/csvTable'
import { recordAudit, type Actor } from '../audit/service'
import { insertPlayer } from './service'
import { LIMITS } from '../../shared/constants'
import { PLAYER_CSV_COLUMNS, playerCsvRow, type CsvRowError } from '../../shared/schemas/panel'
import { zodMessages } from '../../shared/schemas/fieldErrors'

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
  const records = readCsvTable(text, {
    what: 'file',
    rowName: 'player',
    columns: PLAYER_CSV_COLUMNS,
    required: REQUIRED,
    maxRows: LIMITS.csvMaxRows,
  })

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
