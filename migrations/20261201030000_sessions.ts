import type { Knex } from 'knex'

// Blind sessions, the players invited to them and the answers they give.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasTable('sessions'))) {
    await knex.schema.createTable('sessions', (t) => {
      t.increments('id')
      t.string('name', 120).notNullable()
      t.text('purpose').notNullable().defaultTo('')
      t.string('format', 20).notNullable()
      t.string('status', 20).notNullable().defaultTo('draft')
      // Every player's order and every blind code is rebuilt from this; never changed.
      t.string('seed', 64).notNullable()
      t.text('recipe_ids').notNullable().defaultTo('[]')
      // [{ key, clipIds }]: the matched sets chosen, by clip id.
      t.text('clip_sets').notNullable().defaultTo('[]')
      // Copied in full, so later edits to an attribute elsewhere leave a running session alone.
      t.text('attributes').notNullable().defaultTo('[]')
      t.integer('duplicates').notNullable().defaultTo(0)
      t.boolean('allow_no_preference').notNullable().defaultTo(false)
      t.text('instructions').notNullable().defaultTo('')
      t.string('deadline', 10).notNullable()
      t.integer('reminder_days_before')
      t.integer('parent_session_id').references('sessions.id').onDelete('SET NULL')
      t.string('time_point_label', 40)
      t.integer('created_by').references('users.id').onDelete('SET NULL')
      t.string('created_at', 30).notNullable()
      t.string('updated_at', 30).notNullable()
      t.string('opened_at', 30)
      t.string('closed_at', 30)
      t.index(['status'])
      t.index(['parent_session_id'])
    })
  }

  if (!(await knex.schema.hasTable('invitations'))) {
    await knex.schema.createTable('invitations', (t) => {
      t.increments('id')
      t.integer('session_id').notNullable().references('sessions.id').onDelete('CASCADE')
      t.integer('player_id').notNullable().references('players.id').onDelete('RESTRICT')
      // Which plan of the session's design this player follows (0, 1, 2, … in invitation order).
      t.integer('player_index').notNullable()
      // The link's jti; cleared on revocation so every link sent before stops working.
      t.string('token_id', 40).unique()
      t.string('invited_at', 30).notNullable()
      t.string('last_sent_at', 30).notNullable()
      t.string('opened_at', 30)
      t.string('started_at', 30)
      t.string('completed_at', 30)
      t.string('revoked_at', 30)
      t.string('last_reminded_at', 30)
      t.integer('reminders_sent').notNullable().defaultTo(0)
      // The one automatic reminder before the deadline; kept apart from reminders sent by hand.
      t.string('auto_reminded_at', 30)
      t.unique(['session_id', 'player_id'])
      t.unique(['session_id', 'player_index'])
    })
  }

  if (!(await knex.schema.hasTable('answers'))) {
    await knex.schema.createTable('answers', (t) => {
      t.increments('id')
      t.integer('invitation_id').notNullable().references('invitations.id').onDelete('CASCADE')
      t.integer('trial_index').notNullable()
      t.text('payload').notNullable()
      t.string('answered_at', 30).notNullable()
      // A retried submission of the same trial can never count twice.
      t.unique(['invitation_id', 'trial_index'])
    })
  }
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ['answers', 'invitations', 'sessions']) {
    await knex.schema.dropTableIfExists(table)
  }
}
