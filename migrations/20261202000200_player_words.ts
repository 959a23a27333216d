import type { Knex } from 'knex'

// The only session words players see: a player title and a player message, apart from the staff
// name and purpose. The message is what the design used to call its instructions, so that column
// is renamed and keeps its text. Sessions made before get a neutral title from their format,
// never from the staff name, which may name the recipes under test.

const NEUTRAL_TITLE = {
  listening: 'Listening session',
  playtest: 'Play-test session',
}

export async function up(knex: Knex): Promise<void> {
  const hasMessage = await knex.schema.hasColumn('sessions', 'player_message')
  if (!hasMessage && (await knex.schema.hasColumn('sessions', 'instructions')))
    await knex.schema.alterTable('sessions', (t) =>
      t.renameColumn('instructions', 'player_message'),
    )
  else if (!hasMessage)
    await knex.schema.alterTable('sessions', (t) => {
      t.text('player_message').notNullable().defaultTo('')
    })
  if (!(await knex.schema.hasColumn('sessions', 'player_title')))
    await knex.schema.alterTable('sessions', (t) => {
      t.string('player_title', 80).notNullable().defaultTo('')
    })
  // Only titles still empty, so running this again leaves titles people have written alone.
  await knex('sessions')
    .where({ player_title: '' })
    .update({
      player_title: knex.raw('case when format = ? then ? else ? end', [
        'playtest',
        NEUTRAL_TITLE.playtest,
        NEUTRAL_TITLE.listening,
      ]),
    })
}

export async function down(knex: Knex): Promise<void> {
  // A plain DROP COLUMN (SQLite 3.35+, PostgreSQL): knex would rebuild the SQLite table, and
  // dropping the old one inside the migration's transaction cascades to every invitation.
  if (await knex.schema.hasColumn('sessions', 'player_title'))
    await knex.raw('alter table sessions drop column player_title')
  if (
    (await knex.schema.hasColumn('sessions', 'player_message')) &&
    !(await knex.schema.hasColumn('sessions', 'instructions'))
  )
    await knex.schema.alterTable('sessions', (t) =>
      t.renameColumn('player_message', 'instructions'),
    )
}
