import bcrypt from 'bcryptjs'
import type { Knex } from 'knex'

/**
 * Base data every installation needs: a first admin, taken from RINGDOWN_ADMIN_EMAIL and
 * RINGDOWN_ADMIN_PASSWORD when no admin exists yet (how a production server gets its first user).
 */
export async function seed(knex: Knex): Promise<void> {
  const email = process.env.RINGDOWN_ADMIN_EMAIL?.trim().toLowerCase()
  const password = process.env.RINGDOWN_ADMIN_PASSWORD
  if (!email || !password) return
  if (await knex('users').where({ role: 'admin' }).first()) return
  const now = new Date().toISOString()
  await knex('users').insert({
    email,
    name: process.env.RINGDOWN_ADMIN_NAME || 'Administrator',
    role: 'admin',
    status: 'active',
    password_hash: await bcrypt.hash(password, 10),
    created_at: now,
    updated_at: now,
  })
}
