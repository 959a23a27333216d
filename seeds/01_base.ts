import bcrypt from 'bcryptjs'
import type { Knex } from 'knex'
import { passwordProblems } from '../shared/passwordRule'
import { estimateStrength } from '../shared/passwordStrength'

/**
 * Base data every installation needs: a first admin, taken from RINGDOWN_ADMIN_EMAIL and
 * RINGDOWN_ADMIN_PASSWORD when no admin exists yet (how a production server gets its first user).
 * The password must pass the same rule as every other staff password: the first admin is the
 * account an attacker most wants, and nobody would notice a weak one set by a deploy script.
 */
export async function seed(knex: Knex): Promise<void> {
  const email = process.env.RINGDOWN_ADMIN_EMAIL?.trim().toLowerCase()
  const password = process.env.RINGDOWN_ADMIN_PASSWORD
  if (!email || !password) return
  if (await knex('users').where({ role: 'admin' }).first()) return
  const name = process.env.RINGDOWN_ADMIN_NAME || 'Administrator'
  const problems = passwordProblems(password, estimateStrength, { email, name })
  if (problems.length)
    throw new Error(
      `RINGDOWN_ADMIN_PASSWORD is refused: ${problems.join('; ')}. Set a longer, less common one and start again.`,
    )
  const now = new Date().toISOString()
  await knex('users').insert({
    email,
    name,
    role: 'admin',
    status: 'active',
    password_hash: await bcrypt.hash(password, 10),
    created_at: now,
    updated_at: now,
  })
}
