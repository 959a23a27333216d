import type { Knex } from 'knex'

/** A LIKE pattern that finds `text` anywhere, with % and _ typed by a user taken literally. */
export function containsPattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
}

/** `column LIKE '%text%'` with the escape clause SQLite needs for containsPattern. */
export function whereContains(q: Knex.QueryBuilder, column: string, text: string, or = false) {
  const sql = `?? LIKE ? ESCAPE '\\'`
  const args = [column, containsPattern(text)]
  return or ? q.orWhereRaw(sql, args) : q.whereRaw(sql, args)
}
