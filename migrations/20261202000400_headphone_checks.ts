import type { Knex } from 'knex'

// Every attempt at the headphone check, dealt and scored by the server, and the players an
// analyst took back into a session's findings although their check failed. The results the
// invitations kept until now are moved over by the next migration.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasTable('headphone_checks'))) {
    await knex.schema.createTable('headphone_checks', (t) => {
      t.increments('id')
      t.integer('invitation_id').notNullable().references('invitations.id').onDelete('CASCADE')
      // 1 for the first attempt; a retry is the next number.
      t.integer('attempt').notNullable()
      // The tone orders dealt ([["quiet","reference","antiphase"], …]) and the player's picks;
      // null for results kept from before the server dealt them.
      t.text('dealt')
      t.text('responses')
      // Null while the dealt attempt is unanswered.
      t.integer('correct')
      t.integer('trials')
      t.boolean('passed')
      t.string('dealt_at', 30)
      t.string('at', 30)
      t.unique(['invitation_id', 'attempt'])
    })
  }
  if (!(await knex.schema.hasTable('headphone_inclusions'))) {
    await knex.schema.createTable('headphone_inclusions', (t) => {
      t.increments('id')
      t.integer('session_id').notNullable().references('sessions.id').onDelete('CASCADE')
      t.integer('player_id').notNullable().references('players.id').onDelete('RESTRICT')
      t.text('reason').notNullable()
      t.integer('created_by').references('users.id').onDelete('SET NULL')
      t.string('created_at', 30).notNullable()
      t.unique(['session_id', 'player_id'])
    })
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('headphone_inclusions')
  await knex.schema.dropTableIfExists('headphone_checks')
}
