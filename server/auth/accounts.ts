import { randomUUID } from 'node:crypto'
import bcrypt from 'bcryptjs'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { invalidToken, unauthenticated } from '../errors'
import { signLink, verifyLink } from './tokens'
import { recordAudit, type Actor } from '../audit/service'
import { renderMail } from '../mail/template'
import type { Me } from '../../shared/types/api'
import { DEMO_EMAILS } from './demoAccounts'
import type { Role } from '../../shared/constants'

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

// Compared against when the e-mail is unknown, so a wrong e-mail costs the same time as a wrong
// password and the two cannot be told apart. It must use the configured cost: a cheaper dummy
// answers unknown addresses measurably faster.
const dummyHashes = new Map<number, string>()
function dummyHash(cost: number): string {
  let hash = dummyHashes.get(cost)
  if (!hash) dummyHashes.set(cost, (hash = bcrypt.hashSync('not-a-real-password', cost)))
  return hash
}

const WRONG = 'E-mail or password is not right'

export async function signIn(
  ctx: AppContext,
  email: string,
  password: string,
  ip: string | null,
): Promise<UserRow> {
  const user: UserRow | undefined = await ctx.knex('users').where({ email }).first()
  const ok = await bcrypt.compare(password, user?.password_hash ?? dummyHash(ctx.config.bcryptCost))
  const now = ctx.clock.now()
  // Demo accounts have a published password: never let one in on a production server.
  const demoRefused = ctx.config.env === 'production' && DEMO_EMAILS.includes(email)
  if (!user || !ok || !user.password_hash || user.status !== 'active' || demoRefused) {
    await recordAudit(
      ctx.knex,
      now,
      { userId: null, email, ip },
      {
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
      },
    )
    throw unauthenticated(WRONG)
  }
  await ctx.knex('users').where({ id: user.id }).update({ last_login_at: now.toISOString() })
  await recordAudit(
    ctx.knex,
    now,
    { userId: user.id, email: user.email, ip },
    { action: 'auth.sign_in', targetType: 'user', targetId: user.id },
  )
  return user
}

/** The user behind a session cookie, if it is still allowed in. */
export async function activeUser(
  knex: Knex,
  id: number,
  tokenVersion: number,
): Promise<UserRow | null> {
  const user: UserRow | undefined = await knex('users').where({ id }).first()
  if (!user || user.status !== 'active' || user.token_version !== tokenVersion) return null
  return user
}

export type LinkPurpose = 'reset' | 'invite'

const LINK_SECONDS: Record<LinkPurpose, number> = {
  reset: 60 * 60,
  // A new colleague may not read mail the same day.
  invite: 7 * 24 * 60 * 60,
}

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
  return `${ctx.config.publicUrl}/set-password?token=${encodeURIComponent(token)}`
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
  return { user, link }
}

export async function setPasswordWithLink(
  ctx: AppContext,
  token: string,
  password: string,
  ip: string | null,
): Promise<UserRow> {
  const { user, link } = await resolveLink(ctx, token)
  const hash = await bcrypt.hash(password, ctx.config.bcryptCost)
  const now = ctx.clock.now().toISOString()
  await ctx.knex.transaction(async (trx) => {
    // The guard on used_at makes a double submit of the same link count once.
    const n = await trx('link_tokens')
      .where({ id: link.id })
      .whereNull('used_at')
      .update({ used_at: now })
    if (n !== 1) throw invalidToken('This link has already been used. Ask for a new one.')
    await trx('users')
      .where({ id: user.id })
      .update({
        password_hash: hash,
        status: 'active',
        token_version: user.token_version + 1,
        updated_at: now,
      })
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
  })
  return { ...user, status: 'active', token_version: user.token_version + 1 }
}

/** Always succeeds from the caller's view: whether the address exists is not revealed. */
export async function requestPasswordReset(ctx: AppContext, email: string, actor: Actor) {
  const user: UserRow | undefined = await ctx.knex('users').where({ email }).first()
  await recordAudit(ctx.knex, ctx.clock.now(), actor, {
    action: 'auth.reset_requested',
    targetType: 'user',
    targetId: user?.id,
    details: { email, known: Boolean(user && user.status === 'active') },
  })
  if (!user || user.status !== 'active') return
  await ctx.knex.transaction(async (trx) => {
    const url = await createLink(ctx, trx, user.id, 'reset')
    const mail = renderMail({
      subject: 'Reset your Ringdown password',
      greeting: `Hello ${user.name},`,
      paragraphs: [
        'Someone asked to reset the password of your Ringdown account. If it was you, choose a new password with the link below. It works once and for one hour.',
        'If it was not you, ignore this mail: your password stays as it is.',
      ],
      action: { label: 'Choose a new password', url },
    })
    await ctx.outbox.enqueue({ to: user.email, kind: 'password_reset', ...mail }, trx)
  })
  void ctx.outbox.deliverDue()
}
