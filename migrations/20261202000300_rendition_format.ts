import type { Knex } from 'knex'

// What each clip's blind rendition is: every rendition of a matched set shares one sample rate,
// channel count, bit depth and length, and its loudness is measured on the file itself. Null
// until the rendition is written under that rule: renditions made before are re-made when the
// app starts (server/clips/refreshRenditions.ts), which needs the media folder, not a migration.

const COLUMNS = [
  'rendition_sample_rate',
  'rendition_channels',
  'rendition_bit_depth',
  'rendition_duration_s',
  'rendition_loudness_lufs',
] as const

export async function up(knex: Knex): Promise<void> {
  if (await knex.schema.hasColumn('clips', COLUMNS[0])) return
  await knex.schema.alterTable('clips', (t) => {
    t.integer('rendition_sample_rate')
    t.integer('rendition_channels')
    t.integer('rendition_bit_depth')
    t.float('rendition_duration_s')
    t.float('rendition_loudness_lufs')
  })
}

export async function down(knex: Knex): Promise<void> {
  // Plain DROP COLUMNs: knex would rebuild the SQLite table, and dropping the old one inside the
  // migration's transaction cascades to the rows that refer to clips.
  for (const column of COLUMNS)
    if (await knex.schema.hasColumn('clips', column))
      await knex.raw(`alter table clips drop column ${column}`)
}
