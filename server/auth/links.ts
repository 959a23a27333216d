import { randomUUID } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { invalidToken } from '../errors'
import { recordAudit } from '../audit/service'
import { signLink, verifyLink } from './tokens'
import type { UserRow } from './accounts'
import { assertPasswordRule, hashPassword, isRefusedDemo } from './passwords'
import { endSignInsOf, startSignIn } from './signIns'
import { queuePasswordChangedMail } from './mails'

// Set-password links: the invitation of a new colleague and the password reset. Signed,
// expiring, and single use through link_tokens.

export type LinkPurpose = 'reset' | 'invite'

const LINK_SECONDS: Record<LinkPurpose, number> = {
  reset: 60 * 60,
  // A new colleague may not read mail the same day.
  invite: 7 * 24 * 60 * 60,
}

/**
 * Makes a link and returns its address. The token rides in the fragment, which browsers never
 * send to any server: not to ours, not to a proxy, not in a Referer.
 */
export async function createLink(
  ctx: AppContext,
  db: Knex,
  userId: number,
  purpose: LinkPurpose,
): Promise<string> {
  const now = ctx.clock.now()
  const id = randomUUID()
  // Older unused links for the same purpose stop working: only the newest mail counts.
  await db('link_tokens')
    .where({ user_id: userId, purpose })
    .whereNull('used_at')
    .update({ used_at: now.toISOString() })
  await db('link_tokens').insert({
    id,
    user_id: userId,
    purpose,
    expires_at: new Date(now.getTime() + LINK_SECONDS[purpose] * 1000).toISOString(),
    created_at: now.toISOString(),
  })
  const token = signLink(
    ctx.config.jwtSecret,
    ctx.clock,
    { jti: id, sub: userId, purpose },
    LINK_SECONDS[purpose],
  )
  return `${ctx.config.publicUrl}/set-password#token=${encodeURIComponent(token)}`
}

interface LinkRow {
  id: string
  user_id: number
  purpose: LinkPurpose
  expires_at: string
  used_at: string | null
}

/** Checks a set-password link without using it up; tells the page whom it is for. */
export async function inspectLink(
  ctx: AppContext,
  token: string,
): Promise<{ email: string; name: string; purpose: LinkPurpose }> {
  const { user, link } = await resolveLink(ctx, token)
  return { email: user.email, name: user.name, purpose: link.purpose }
}

async function resolveLink(
  ctx: AppContext,
  token: string,
): Promise<{ user: UserRow; link: LinkRow }> {
  const claims = verifyLink(ctx.config.jwtSecret, ctx.clock, token)
  if (claims === 'expired') throw invalidToken('This link has expired. Ask for a new one.')
  if (!claims) throw invalidToken('This link is not valid. Check that it was copied whole.')
  const link: LinkRow | undefined = await ctx.knex('link_tokens').where({ id: claims.jti }).first()
  if (!link || link.user_id !== claims.sub) throw invalidToken('This link is not valid.')
  if (link.used_at) throw invalidToken('This link has already been used. Ask for a new one.')
  if (link.expires_at < ctx.clock.now().toISOString())
    throw invalidToken('This link has expired. Ask for a new one.')
  const user: UserRow | undefined = await ctx.knex('users').where({ id: link.user_id }).first()
  if (!user || user.status === 'deactivated')
    throw invalidToken('This account is not active. Ask an admin.')
  // A demo account's password is published; on a production server no link lets one in either.
  if (isRefusedDemo(ctx, user.email)) throw invalidToken('This link is not valid.')
  return { user, link }
}

/**
 * Uses a link: the password is set, every earlier sign-in of the account ends, and a new one
 * starts for whoever used the link. A reset also tells the owner by mail.
 */
export async function setPasswordWithLink(
  ctx: AppContext,
  token: string,
  password: string,
  ip: string | null,
): Promise<{ user: UserRow; signInId: string }> {
  const { user, link } = await resolveLink(ctx, token)
  assertPasswordRule(password, user, 'password')
  const hash = await hashPassword(ctx, password)
  const now = ctx.clock.now().toISOString()
  const updated: UserRow = {
    ...user,
    password_hash: hash,
    status: 'active',
    token_version: user.token_version + 1,
    updated_at: now,
  }
  const signInId = await ctx.knex.transaction(async (trx) => {
    // The guard on used_at makes a double submit of the same link count once.
    const n = await trx('link_tokens')
      .where({ id: link.id })
      .whereNull('used_at')
      .update({ used_at: now })
    if (n !== 1) throw invalidToken('This link has already been used. Ask for a new one.')
    await trx('users').where({ id: user.id }).update({
      password_hash: hash,
      status: 'active',
      token_version: updated.token_version,
      updated_at: now,
    })
    await endSignInsOf(ctx, trx, user.id)
    await recordAudit(
      trx,
      ctx.clock.now(),
      { userId: user.id, email: user.email, ip },
      {
        action: link.purpose === 'invite' ? 'auth.account_activated' : 'auth.password_reset',
        targetType: 'user',
        targetId: user.id,
      },
    )
    if (link.purpose === 'reset') await queuePasswordChangedMail(ctx, trx, updated)
    return startSignIn(ctx, user.id, trx)
  })
  if (link.purpose === 'reset') void ctx.outbox.deliverDue()
  return { user: updated, signInId }
}
