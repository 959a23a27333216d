import type { Knex } from 'knex'

// One row per invitation or reminder mail a session queues, so the hourly cap per session counts
// every mail, not only the latest time kept on each invitation. No address is kept here: the
// count needs the session and the time only. Rows older than an hour are pruned as mail goes.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasTable('session_mail_log'))) {
    await knex.schema.createTable('session_mail_log', (t) => {
      t.increments('id')
      t.integer('session_id').notNullable().references('sessions.id').onDelete('CASCADE')
      // 'invitation' or 'reminder'
      t.string('kind', 20).notNullable()
      t.string('queued_at', 30).notNullable()
      t.index(['session_id', 'queued_at'])
    })
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('session_mail_log')
}
