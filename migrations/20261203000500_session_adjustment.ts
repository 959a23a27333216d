import type { Knex } from 'knex'

// Two analysis choices the design makes before anyone answers, locked with it so they cannot
// follow the results: how each family of pairs is adjusted (Holm or Benjamini–Hochberg), and
// the smallest difference worth finding, in rating points, that the interim look plans for.
// Sessions from before keep Holm, which is what their findings always used, and no target.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn('sessions', 'adjustment')))
    await knex.schema.alterTable('sessions', (t) => {
      t.string('adjustment', 10).notNullable().defaultTo('holm')
      t.float('target_difference')
    })
}

export async function down(knex: Knex): Promise<void> {
  // A plain DROP COLUMN: knex would rebuild the SQLite table, and dropping the old one inside
  // the migration's transaction cascades to every invitation and answer.
  for (const column of ['adjustment', 'target_difference'])
    if (await knex.schema.hasColumn('sessions', column))
      await knex.raw(`alter table sessions drop column ${column}`)
}
