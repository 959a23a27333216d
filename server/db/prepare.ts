import type { Knex } from 'knex'

/**
 * Brings the schema up to date and runs the seeds. Seeds only add what is missing, so this is
 * safe on every start and never touches data that is already there.
 */
export async function prepareDatabase(knex: Knex): Promise<void> {
  await knex.migrate.latest()
  await knex.seed.run()
}
