import type { FindingsTable, SessionFindings } from '../../shared/schemas/findings'
import type { LongRow } from './answersToRatings'
import type { FindingsData } from './data'
import { toCsv } from './exports/csv'
import { EXPORT_TABLES } from './exports/tables'

// The CSV exports: the raw answers, and each findings table through its entry in
// exports/tables.ts.

export { toCsv }

/** The raw answers in long format: one row per player × trial × attribute. */
export function answersCsv(data: FindingsData): string {
  const recipeName = new Map<string, string>(data.recipes.map((r) => [String(r.id), r.name]))
  const name = (id: unknown) => recipeName.get(String(id)) ?? String(id)
  const player = new Map(data.players.map((p) => [p.code, p]))
  const header = [
    'session',
    'player',
    'level',
    'instruments',
    'excluded',
    'trial',
    'repeat_of',
    'kind',
    'excerpt',
    'attribute',
    'blind_codes',
    'recipes',
    'answer_code',
    'answer_recipe',
    'value',
    'comment',
    'answered_at',
  ]
  if (!data.resolved.rows) throw new Error('The answer export needs findings data loaded with rows')
  const rows = data.resolved.rows.map((r: LongRow) => {
    const p = player.get(String(r.player))
    return [
      data.session.id,
      String(r.player),
      p?.level,
      p?.instruments.join(' '),
      p ? p.exclusionReason !== null : false,
      r.trial,
      r.repeatOf,
      r.kind,
      r.excerpt,
      r.attribute,
      r.codes.join(' '),
      r.recipes.map(name).join(' | '),
      r.answerCode,
      r.answerRecipe === null ? null : name(r.answerRecipe),
      r.value,
      r.comment,
      r.answeredAt,
    ]
  })
  return toCsv(header, rows)
}

/** One findings table as CSV, with recipe names spelled out beside the ids. */
export function tableCsv(f: SessionFindings, table: FindingsTable): string {
  const names = new Map(f.recipes.map((r) => [r.id, r.name]))
  const name = (id: number) => names.get(id) ?? String(id)
  const { header, rows } = EXPORT_TABLES[table]
  return toCsv(header, rows(f, name))
}

/** A neutral attachment name: the session id and the table, nothing else. */
export const exportFileName = (sessionId: number, what: string) =>
  `session-${sessionId}-${what}.csv`
