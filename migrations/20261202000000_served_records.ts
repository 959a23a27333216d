import type { Knex } from 'knex'

// What each player is served, kept as data: findings, exports and the player's own pages read
// it instead of rebuilding plans from today's clips. Used clips and recipes are archived, not
// deleted. The records of sessions opened before this change are written by the next migration.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasTable('served_plans'))) {
    await knex.schema.createTable('served_plans', (t) => {
      t.integer('invitation_id').primary().references('invitations.id').onDelete('CASCADE')
      t.integer('session_id').notNullable().references('sessions.id').onDelete('CASCADE')
      // The trials in serving order: codes, positions, clip and recipe ids, rendition gains.
      t.text('trials').notNullable()
      t.string('fixed_at', 30).notNullable()
      t.index(['session_id'])
    })
  }
  if (!(await knex.schema.hasColumn('sessions', 'record_problem')))
    await knex.schema.alterTable('sessions', (t) => {
      // Why the served record of an older session could not be rebuilt safely; null when sound.
      t.text('record_problem')
    })
  for (const table of ['clips', 'recipes'])
    if (!(await knex.schema.hasColumn(table, 'archived_at')))
      await knex.schema.alterTable(table, (t) => {
        t.string('archived_at', 30)
      })
}

export async function down(knex: Knex): Promise<void> {
  // Plain DROP COLUMNs: knex would rebuild each SQLite table, and dropping the old one inside
  // the migration's transaction cascades to the rows that refer to it (sessions' invitations).
  for (const table of ['clips', 'recipes'])
    if (await knex.schema.hasColumn(table, 'archived_at'))
      await knex.raw(`alter table ${table} drop column archived_at`)
  if (await knex.schema.hasColumn('sessions', 'record_problem'))
    await knex.raw('alter table sessions drop column record_problem')
  await knex.schema.dropTableIfExists('served_plans')
}
