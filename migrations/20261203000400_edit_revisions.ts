import type { Knex } from 'knex'

// Rows staff edit through a form and save as a whole carry a revision: a form sends the one it
// was loaded at, and a save over a newer one is refused instead of silently undoing it.
// Excerpts (one switch) and staff accounts (a role picker and buttons) have no such form.
const TABLES = ['sessions', 'recipes', 'clips', 'players'] as const

export async function up(knex: Knex): Promise<void> {
  // A plain ADD COLUMN: knex may rebuild a SQLite table to alter it, and a rebuild would drop
  // the findings-stamp triggers these tables carry.
  for (const table of TABLES)
    if (!(await knex.schema.hasColumn(table, 'revision')))
      await knex.raw(`ALTER TABLE ${table} ADD COLUMN revision integer not null default 1`)
}

export async function down(knex: Knex): Promise<void> {
  // A plain DROP COLUMN, for the same reason and because a rebuild inside the migration's
  // transaction would cascade to every row that refers to these tables.
  for (const table of TABLES)
    if (await knex.schema.hasColumn(table, 'revision'))
      await knex.raw(`ALTER TABLE ${table} DROP COLUMN revision`)
}
