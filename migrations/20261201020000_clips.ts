import type { Knex } from 'knex'

// Recordings of recipes and the managed list of passages they play.
export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasTable('excerpts'))) {
    await knex.schema.createTable('excerpts', (t) => {
      t.increments('id')
      t.string('name', 80).notNullable().unique()
      t.text('description').notNullable().defaultTo('')
      // Retired excerpts stay so that older clips keep their label; they are offered no more.
      t.boolean('active').notNullable().defaultTo(true)
      t.string('created_at', 30).notNullable()
    })
  }

  if (!(await knex.schema.hasTable('clips'))) {
    await knex.schema.createTable('clips', (t) => {
      t.increments('id')
      // A recipe with recordings cannot vanish under them; its clips are deleted first.
      t.integer('recipe_id').notNullable().references('recipes.id').onDelete('RESTRICT')
      t.integer('excerpt_id').notNullable().references('excerpts.id').onDelete('RESTRICT')
      t.string('performer_code', 40).notNullable()
      t.string('instrument_code', 40).notNullable()
      t.string('bow_stroke', 40).notNullable().defaultTo('')
      t.string('string_played', 4).notNullable().defaultTo('')
      t.integer('strings_age_days')
      t.string('recorded_on', 10)
      t.string('kind', 10).notNullable()
      t.text('notes').notNullable().defaultTo('')
      // The uploader's file name lives only here; files on disk have random names.
      t.string('original_name', 255).notNullable()
      t.string('original_file', 80).notNullable().unique()
      t.string('rendition_file', 80).notNullable().unique()
      t.float('rendition_gain_db').notNullable()
      t.string('container', 10).notNullable()
      t.float('duration_s').notNullable()
      t.integer('sample_rate').notNullable()
      t.integer('channels').notNullable()
      t.integer('bit_depth').notNullable()
      t.float('peak_dbfs').notNullable()
      t.float('loudness_lufs').notNullable()
      t.float('centroid_hz')
      t.float('f0_hz')
      t.float('t60_s')
      t.float('loss_factor')
      t.float('attack_s')
      // { min: number[], max: number[] } for drawing the waveform without decoding.
      t.text('peaks').notNullable().defaultTo('{"min":[],"max":[]}')
      t.integer('created_by').references('users.id').onDelete('SET NULL')
      t.string('created_at', 30).notNullable()
      t.string('updated_at', 30).notNullable()
      // A matched set: the same excerpt by the same performer on the same instrument.
      t.index(['excerpt_id', 'performer_code', 'instrument_code'])
      t.index(['recipe_id'])
    })
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('clips')
  await knex.schema.dropTableIfExists('excerpts')
}
