import bcrypt from 'bcryptjs'
import type { AppContext } from '../context'
import { validationFailed } from '../errors'
import { passwordProblems, type PasswordOwner } from '../../shared/passwordRule'
import { estimateStrength } from '../../shared/passwordStrength'
import { DEMO_EMAILS } from './demoAccounts'

// Hashing and checking staff passwords, and the rule for new ones with the owner known.

// Compared against when there is no hash (unknown e-mail, account never activated), so those
// cost the same time as a wrong password and cannot be told apart. It must use the configured
// cost: a cheaper dummy answers unknown addresses measurably faster.
const dummyHashes = new Map<number, string>()
function dummyHash(cost: number): string {
  let hash = dummyHashes.get(cost)
  if (!hash) dummyHashes.set(cost, (hash = bcrypt.hashSync('not-a-real-password', cost)))
  return hash
}

/**
 * Whether a typed password is the one hashed. bcrypt ignores every byte after the 72nd, so a
 * longer one would match on its first 72 alone: it never matches (the rule never stores one).
 */
export async function passwordMatches(
  ctx: AppContext,
  password: string,
  hash: string | null | undefined,
): Promise<boolean> {
  const ok = await bcrypt.compare(password, hash ?? dummyHash(ctx.config.bcryptCost))
  return ok && Boolean(hash) && !bcrypt.truncates(password)
}

export function hashPassword(ctx: AppContext, password: string): Promise<string> {
  return bcrypt.hash(password, ctx.config.bcryptCost)
}

/** The whole rule, with the owner's name and address; a 422 at `field` otherwise. */
export function assertPasswordRule(password: string, owner: PasswordOwner, field: string) {
  const problems = passwordProblems(password, estimateStrength, owner)
  if (problems.length)
    throw validationFailed('Choose another password', { fields: { [field]: problems } })
}

/** Demo accounts have a published password: on a production server they are never let in. */
export const isRefusedDemo = (ctx: AppContext, email: string) =>
  ctx.config.env === 'production' && DEMO_EMAILS.includes(email)
