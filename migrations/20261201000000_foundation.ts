import type { Knex } from 'knex'

// Staff accounts, the player panel, single-use link tokens, the mail outbox and the audit log.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id')
    t.string('email', 254).notNullable().unique()
    t.string('name', 120).notNullable()
    t.string('role', 20).notNullable()
    t.string('password_hash', 100)
    t.string('status', 20).notNullable().defaultTo('invited')
    // Bumped on deactivation and password change so every cookie issued before stops working.
    t.integer('token_version').notNullable().defaultTo(0)
    t.string('created_at', 30).notNullable()
    t.string('updated_at', 30).notNullable()
    t.string('last_login_at', 30)
  })

  await knex.schema.createTable('players', (t) => {
    t.increments('id')
    // Pseudonymous code that stays when personal data is deleted on request.
    t.string('code', 16).notNullable().unique()
    t.string('name', 120)
    t.string('email', 254).unique()
    t.text('instruments').notNullable().defaultTo('[]')
    t.string('level', 20).notNullable()
    t.string('region', 80).notNullable().defaultTo('')
    t.string('consent_date', 10)
    t.text('notes').notNullable().defaultTo('')
    t.string('status', 20).notNullable().defaultTo('active')
    t.string('created_at', 30).notNullable()
    t.string('updated_at', 30).notNullable()
    t.string('deleted_at', 30)
    t.index(['status'])
  })

  await knex.schema.createTable('link_tokens', (t) => {
    t.string('id', 40).primary()
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE')
    t.string('purpose', 20).notNullable()
    t.string('expires_at', 30).notNullable()
    t.string('used_at', 30)
    t.string('created_at', 30).notNullable()
  })

  await knex.schema.createTable('outbox', (t) => {
    t.increments('id')
    t.string('to', 254).notNullable()
    t.string('subject', 200).notNullable()
    t.text('text').notNullable()
    t.text('html').notNullable()
    t.string('kind', 40).notNullable()
    t.string('status', 20).notNullable().defaultTo('pending')
    t.integer('attempts').notNullable().defaultTo(0)
    t.text('last_error')
    t.string('next_attempt_at', 30)
    t.string('created_at', 30).notNullable()
    t.string('sent_at', 30)
    t.index(['status', 'next_attempt_at'])
  })

  await knex.schema.createTable('audit_log', (t) => {
    t.increments('id')
    t.string('at', 30).notNullable()
    t.integer('actor_user_id').references('users.id').onDelete('SET NULL')
    t.string('actor_email', 254)
    t.string('action', 60).notNullable()
    t.string('target_type', 40)
    t.string('target_id', 40)
    t.text('details').notNullable().defaultTo('{}')
    t.string('ip', 64)
    t.index(['at'])
    t.index(['action'])
  })
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ['audit_log', 'outbox', 'link_tokens', 'players', 'users']) {
    await knex.schema.dropTableIfExists(table)
  }
}
