import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { unauthenticated } from '../errors'
import { recordAudit } from '../audit/service'
import type { Me } from '../../shared/types/api'
import type { Role } from '../../shared/constants'
import { isRefusedDemo, passwordMatches } from './passwords'
import { assertAccountMayTry, pruneFailures, recordFailure } from './throttle'
import { startSignIn } from './signIns'
import type { SessionClaims } from './tokens'

// Staff accounts as sign-in sees them. The links (invitation, reset) are in links.ts.
export { createLink, type LinkPurpose } from './links'

export interface UserRow {
  id: number
  email: string
  name: string
  role: Role
  password_hash: string | null
  status: 'invited' | 'active' | 'deactivated'
  token_version: number
  created_at: string
  updated_at: string
  last_login_at: string | null
}

export const toMe = (u: UserRow): Me => ({ id: u.id, email: u.email, name: u.name, role: u.role })

const WRONG = 'E-mail or password is not right'

export async function signIn(
  ctx: AppContext,
  email: string,
  password: string,
  ip: string | null,
): Promise<{ user: UserRow; signInId: string }> {
  const actor = { userId: null, email, ip }
  try {
    await assertAccountMayTry(ctx, email)
  } catch (err) {
    await recordAudit(ctx.knex, ctx.clock.now(), actor, {
      action: 'auth.sign_in_failed',
      targetType: 'user',
      details: { reason: 'account waiting after failed attempts' },
    })
    throw err
  }
  const user: UserRow | undefined = await ctx.knex('users').where({ email }).first()
  const ok = await passwordMatches(ctx, password, user?.password_hash)
  const now = ctx.clock.now()
  const demoRefused = isRefusedDemo(ctx, email)
  if (!user || !ok || user.status !== 'active' || demoRefused) {
    await recordFailure(ctx, email)
    await recordAudit(ctx.knex, now, actor, {
      action: 'auth.sign_in_failed',
      targetType: 'user',
      targetId: user?.id,
      details: {
        reason: demoRefused
          ? 'demo account in production'
          : !user || !ok
            ? 'wrong credentials'
            : `account ${user.status}`,
      },
    })
    throw unauthenticated(WRONG)
  }
  await ctx.knex('users').where({ id: user.id }).update({ last_login_at: now.toISOString() })
  const signInId = await startSignIn(ctx, user.id)
  await pruneFailures(ctx)
  await recordAudit(
    ctx.knex,
    now,
    { userId: user.id, email: user.email, ip },
    { action: 'auth.sign_in', targetType: 'user', targetId: user.id },
  )
  return { user, signInId }
}

/**
 * The user behind a session cookie, if it is still allowed in: the sign-in it names is open and
 * current, and the account active at the token version of the cookie. One read by primary key.
 */
export async function activeUser(
  knex: Knex,
  claims: Pick<SessionClaims, 'sub' | 'tv' | 'sid'>,
  now: Date,
): Promise<UserRow | null> {
  const user: UserRow | undefined = await knex('staff_sign_ins as s')
    .join('users as u', 'u.id', 's.user_id')
    .where('s.id', claims.sid)
    .whereNull('s.ended_at')
    .where('s.expires_at', '>', now.toISOString())
    .first('u.*')
  if (!user || user.id !== claims.sub) return null
  if (user.status !== 'active' || user.token_version !== claims.tv) return null
  return user
}
