import type { Knex } from 'knex'

// Each staff sign-in gets a record the session cookie names, so signing out ends that cookie on
// the server; failed sign-ins are counted per address typed, whoever sent them, so one account
// can be made to wait without the office behind one address being locked out.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasTable('staff_sign_ins'))) {
    await knex.schema.createTable('staff_sign_ins', (t) => {
      // Random, carried as `sid` in the cookie; a guessed one finds nothing.
      t.string('id', 40).primary()
      t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE')
      t.string('created_at', 30).notNullable()
      // Moved on with each cookie renewal; a record past it is pruned.
      t.string('expires_at', 30).notNullable()
      t.string('ended_at', 30)
      t.index(['user_id'])
      t.index(['expires_at'])
    })
  }
  if (!(await knex.schema.hasTable('sign_in_failures'))) {
    await knex.schema.createTable('sign_in_failures', (t) => {
      t.increments('id')
      // The address as typed (lower-cased), known account or not, so the wait reveals nothing.
      t.string('email', 254).notNullable()
      t.string('at', 30).notNullable()
      t.index(['email', 'at'])
      t.index(['at'])
    })
  }
  // Reset mails per account and hour are counted from the links they carry.
  await knex.raw(
    'create index if not exists link_tokens_user_purpose_created on link_tokens (user_id, purpose, created_at)',
  )
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop index if exists link_tokens_user_purpose_created')
  await knex.schema.dropTableIfExists('sign_in_failures')
  await knex.schema.dropTableIfExists('staff_sign_ins')
}
