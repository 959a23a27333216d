import type { Knex } from 'knex'
import { systemClock } from '../server/clock'
import { seedDemoClips } from './demo/clips'
import { mediaFolders } from '../server/clips/storage'

/**
 * Demo recordings for the demo recipes (seeded just before). Skipped in production, once any
 * clip exists, and under tests, which make their own clips in a media folder of their own.
 */
export async function seed(knex: Knex): Promise<void> {
  if (process.env.NODE_ENV === 'production' || process.env.NODE_ENV === 'test') return
  if (await knex('clips').first('id')) return
  await seedDemoClips({
    knex,
    folders: mediaFolders(process.env.MEDIA_DIR || 'media'),
    clock: systemClock,
  })
}
