import { randomBytes } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'

// One record per staff sign-in. The session cookie names it (`sid`), so the server, not the
// browser, decides when a cookie stops working: signing out ends the record, and every copy of
// the cookie with it. A renewed cookie names the same record and moves its end on.

const expiry = (ctx: AppContext, from: Date) =>
  new Date(from.getTime() + ctx.config.sessionMinutes * 60_000).toISOString()

/** Opens a sign-in for a user (after the password or a link proved who they are). */
export async function startSignIn(ctx: AppContext, userId: number, db: Knex = ctx.knex) {
  const now = ctx.clock.now()
  // Records that ran out are of no use to anyone: drop them while we are writing anyway.
  await db('staff_sign_ins').where('expires_at', '<', now.toISOString()).delete()
  // 144 random bits: the record is found by this id alone.
  const id = randomBytes(18).toString('base64url')
  await db('staff_sign_ins').insert({
    id,
    user_id: userId,
    created_at: now.toISOString(),
    expires_at: expiry(ctx, now),
  })
  return id
}

/** Moves a sign-in's end on when its cookie is renewed. */
export async function extendSignIn(ctx: AppContext, id: string, db: Knex = ctx.knex) {
  await db('staff_sign_ins')
    .where({ id })
    .whereNull('ended_at')
    .update({ expires_at: expiry(ctx, ctx.clock.now()) })
}

/** Signing out: the cookie and any copy of it stop working at once. */
export async function endSignIn(ctx: AppContext, id: string) {
  await ctx
    .knex('staff_sign_ins')
    .where({ id })
    .whereNull('ended_at')
    .update({ ended_at: ctx.clock.now().toISOString() })
}

/** Ends every open sign-in of an account but the one kept (a password change keeps its own). */
export async function endSignInsOf(
  ctx: AppContext,
  db: Knex,
  userId: number,
  keep?: string,
): Promise<void> {
  const q = db('staff_sign_ins').where({ user_id: userId }).whereNull('ended_at')
  if (keep) q.whereNot({ id: keep })
  await q.update({ ended_at: ctx.clock.now().toISOString() })
}
