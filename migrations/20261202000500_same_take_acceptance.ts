import type { Knex } from 'knex'

// When a session serves a recipe twice from one take, the designer accepts at opening that a
// player with audio tools could pair the two files; the session keeps when and by whom.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn('sessions', 'same_take_accepted_at')))
    await knex.schema.alterTable('sessions', (t) => {
      t.string('same_take_accepted_at', 30)
      t.string('same_take_accepted_by', 200)
    })
}

export async function down(knex: Knex): Promise<void> {
  // A plain DROP COLUMN: knex would rebuild the SQLite table, and dropping the old one inside
  // the migration's transaction cascades to every invitation and answer.
  for (const column of ['same_take_accepted_at', 'same_take_accepted_by'])
    if (await knex.schema.hasColumn('sessions', column))
      await knex.raw(`alter table sessions drop column ${column}`)
}
