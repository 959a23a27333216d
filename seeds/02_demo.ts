import type { Knex } from 'knex'
import { seedDemoPanel } from './demo/panel'

/** The demo's staff accounts and panel (seeds/demo/panel.ts); skipped in production. */
export async function seed(knex: Knex): Promise<void> {
  if (process.env.NODE_ENV === 'production') return
  await seedDemoPanel(knex)
}
