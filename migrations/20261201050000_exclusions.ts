import type { Knex } from 'knex'

// Players an analyst has set aside from a session's findings. Taking a player back deletes the
// row; the audit log keeps who excluded and included whom, when and why.
export async function up(knex: Knex): Promise<void> {
  if (await knex.schema.hasTable('exclusions')) return
  await knex.schema.createTable('exclusions', (t) => {
    t.increments('id')
    t.integer('session_id').notNullable().references('sessions.id').onDelete('CASCADE')
    // Players are never removed from the panel table (deletion on request keeps the code).
    t.integer('player_id').notNullable().references('players.id').onDelete('RESTRICT')
    t.text('reason').notNullable()
    t.integer('created_by').references('users.id').onDelete('SET NULL')
    t.string('created_at', 30).notNullable()
    t.unique(['session_id', 'player_id'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('exclusions')
}
