import type { AppContext } from '../context'
import { recordAudit, type Actor } from '../audit/service'
import type { UserRow } from './accounts'
import { createLink } from './links'
import { queueResetMail } from './mails'
import { isRefusedDemo } from './passwords'

/**
 * Mails a reset link to an active account, at most Config.mailLimits.resetsPerHour an hour so
 * the form cannot be used to flood someone's inbox. Always succeeds from the caller's view:
 * whether the address exists, or the hour's mails are used up, is not revealed.
 */
export async function requestPasswordReset(ctx: AppContext, email: string, actor: Actor) {
  const user: UserRow | undefined = await ctx.knex('users').where({ email }).first()
  const now = ctx.clock.now()
  const known = Boolean(user && user.status === 'active' && !isRefusedDemo(ctx, email))
  const sent = await ctx.knex.transaction(async (trx) => {
    // Each reset mail carries a link of its own, so the links made in the last hour count them.
    const limited =
      known &&
      Number(
        (
          await trx('link_tokens')
            .where({ user_id: user!.id, purpose: 'reset' })
            .where('created_at', '>', new Date(now.getTime() - 3_600_000).toISOString())
            .count({ n: '*' })
        )[0].n,
      ) >= ctx.config.mailLimits.resetsPerHour
    await recordAudit(trx, now, actor, {
      action: limited ? 'auth.reset_limited' : 'auth.reset_requested',
      targetType: 'user',
      targetId: user?.id,
      details: { email, known },
    })
    if (!known || limited) return false
    await queueResetMail(ctx, trx, user!, await createLink(ctx, trx, user!.id, 'reset'))
    return true
  })
  if (sent) void ctx.outbox.deliverDue()
}
