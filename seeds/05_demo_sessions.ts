import type { Knex } from 'knex'
import { seedContext } from './demo/context'
import { seedDemoSessions } from './demo/sessions'

/**
 * Demo sessions over the demo recipes and clips (seeded just before; seeds/demo/sessions.ts).
 * Skipped in production and under tests, which have no demo clips and build their own.
 */
export async function seed(knex: Knex): Promise<void> {
  if (process.env.NODE_ENV === 'production' || process.env.NODE_ENV === 'test') return
  await seedDemoSessions(seedContext(knex))
}
