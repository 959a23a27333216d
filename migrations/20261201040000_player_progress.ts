import type { Knex } from 'knex'

// A player's steps before the trials, and the opaque addresses their audio is served under.
export async function up(knex: Knex): Promise<void> {
  const columns: [string, (t: Knex.CreateTableBuilder) => void][] = [
    ['consent_at', (t) => t.string('consent_at', 30)],
    // The latest headphone check; a failed one is kept too, so findings can screen on it.
    ['headphone_correct', (t) => t.integer('headphone_correct')],
    ['headphone_trials', (t) => t.integer('headphone_trials')],
    ['headphone_attempts', (t) => t.integer('headphone_attempts').notNullable().defaultTo(0)],
    ['level_set_at', (t) => t.string('level_set_at', 30)],
  ]
  for (const [name, add] of columns) {
    if (!(await knex.schema.hasColumn('invitations', name)))
      await knex.schema.alterTable('invitations', add)
  }

  if (!(await knex.schema.hasTable('player_audio_refs'))) {
    await knex.schema.createTable('player_audio_refs', (t) => {
      // Random, so the address tells nothing of the clip, the trial or the code it plays under.
      t.string('ref', 40).primary()
      t.integer('invitation_id').notNullable().references('invitations.id').onDelete('CASCADE')
      t.integer('clip_id').notNullable().references('clips.id').onDelete('CASCADE')
      // One address per serving: a hidden repeat or a triangle's doubled sample sharing an
      // address with its twin would give the answer away.
      t.integer('code').notNullable()
      t.unique(['invitation_id', 'clip_id', 'code'])
    })
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('player_audio_refs')
  for (const name of [
    'consent_at',
    'headphone_correct',
    'headphone_trials',
    'headphone_attempts',
    'level_set_at',
  ]) {
    if (await knex.schema.hasColumn('invitations', name))
      await knex.schema.alterTable('invitations', (t) => t.dropColumn(name))
  }
}
