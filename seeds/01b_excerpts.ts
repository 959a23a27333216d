import type { Knex } from 'knex'
import { BASE_EXCERPTS } from '../shared/schemas/clips'

/**
 * The passages every installation starts with. Only missing names are added, so excerpts an
 * admin retired or described differently are left as they are.
 */
export async function seed(knex: Knex): Promise<void> {
  const existing = new Set(
    ((await knex('excerpts').select('name')) as { name: string }[]).map((e) => e.name),
  )
  const now = new Date().toISOString()
  for (const e of BASE_EXCERPTS) {
    if (existing.has(e.name)) continue
    await knex('excerpts').insert({ ...e, active: true, created_at: now })
  }
}
