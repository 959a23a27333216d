import type { AppContext } from '../context'
import { validationFailed } from '../errors'
import { recordAudit } from '../audit/service'
import type { ChangePasswordBody } from '../../shared/schemas/auth'
import type { UserRow } from './accounts'
import { assertPasswordRule, hashPassword, passwordMatches } from './passwords'
import { assertAccountMayTry, recordFailure } from './throttle'
import { endSignInsOf, extendSignIn } from './signIns'
import { queuePasswordChangedMail } from './mails'

/**
 * A signed-in colleague changes their own password. The current one must be given (a cookie
 * alone is not enough to take over an account), and a wrong one counts against the account like
 * a failed sign-in. Every other sign-in of the account ends; this one goes on under a new cookie.
 */
export async function changeOwnPassword(
  ctx: AppContext,
  user: UserRow,
  signInId: string,
  body: ChangePasswordBody,
  ip: string | null,
): Promise<UserRow> {
  const actor = { userId: user.id, email: user.email, ip }
  await assertAccountMayTry(ctx, user.email)
  if (!(await passwordMatches(ctx, body.currentPassword, user.password_hash))) {
    await recordFailure(ctx, user.email)
    await recordAudit(ctx.knex, ctx.clock.now(), actor, {
      action: 'auth.password_change_failed',
      targetType: 'user',
      targetId: user.id,
      details: { reason: 'wrong current password' },
    })
    throw validationFailed('Your current password is not right', {
      fields: { currentPassword: ['This is not your current password'] },
    })
  }
  if (body.newPassword === body.currentPassword)
    throw validationFailed('Choose another password', {
      fields: { newPassword: ['The same as your current password: choose a new one'] },
    })
  assertPasswordRule(body.newPassword, user, 'newPassword')
  const hash = await hashPassword(ctx, body.newPassword)
  const now = ctx.clock.now()
  const updated: UserRow = {
    ...user,
    password_hash: hash,
    token_version: user.token_version + 1,
    updated_at: now.toISOString(),
  }
  await ctx.knex.transaction(async (trx) => {
    // The new token version ends every cookie of the account, this one's copies too; the
    // caller gets a new cookie for the same sign-in.
    await trx('users').where({ id: user.id }).update({
      password_hash: hash,
      token_version: updated.token_version,
      updated_at: updated.updated_at,
    })
    await endSignInsOf(ctx, trx, user.id, signInId)
    await extendSignIn(ctx, signInId, trx)
    await recordAudit(trx, now, actor, {
      action: 'auth.password_changed',
      targetType: 'user',
      targetId: user.id,
    })
    await queuePasswordChangedMail(ctx, trx, updated)
  })
  void ctx.outbox.deliverDue()
  return updated
}
