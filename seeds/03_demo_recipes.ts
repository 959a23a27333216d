import type { Knex } from 'knex'
import { seedContext } from './demo/context'
import { seedDemoRecipes } from './demo/recipes'

/** The demo recipes (seeds/demo/recipes.ts); skipped in production. */
export async function seed(knex: Knex): Promise<void> {
  if (process.env.NODE_ENV === 'production') return
  await seedDemoRecipes(seedContext(knex))
}
