import type { AppContext } from '../context'
import { AppError } from '../errors'

// Failed sign-ins are counted per address typed, from whatever network they come: guesses
// spread over many addresses still add up for the account they aim at. Unknown addresses are
// counted alike, so the wait says nothing about whether an account exists. Only failures count,
// and per account, so colleagues behind one office address never wait for each other.

/** How long the account must wait, in ms, or 0 when it may try now. */
export async function accountWait(ctx: AppContext, email: string): Promise<number> {
  const { windowMs, maxFailures } = ctx.config.accountThrottle
  if (maxFailures <= 0) return 0
  const now = ctx.clock.now().getTime()
  const recent: { at: string }[] = await ctx
    .knex('sign_in_failures')
    .where({ email })
    .where('at', '>', new Date(now - windowMs).toISOString())
    .orderBy('at', 'desc')
    .limit(maxFailures)
    .select('at')
  if (recent.length < maxFailures) return 0
  // The account may try again once the oldest of these leaves the window.
  return Math.max(1000, Date.parse(recent[recent.length - 1].at) + windowMs - now)
}

/** Refuses with 429 while the account waits; the message says for how long. */
export async function assertAccountMayTry(ctx: AppContext, email: string): Promise<void> {
  const wait = await accountWait(ctx, email)
  if (wait === 0) return
  const minutes = Math.ceil(wait / 60_000)
  throw new AppError(
    'rate_limited',
    `Too many failed attempts for this account. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again, or ask for a new password.`,
  )
}

export async function recordFailure(ctx: AppContext, email: string): Promise<void> {
  await ctx.knex('sign_in_failures').insert({ email, at: ctx.clock.now().toISOString() })
  await pruneFailures(ctx)
}

/** Failures older than the window count for nothing; the addresses typed are not kept longer. */
export async function pruneFailures(ctx: AppContext): Promise<void> {
  const { windowMs } = ctx.config.accountThrottle
  await ctx
    .knex('sign_in_failures')
    .where('at', '<=', new Date(ctx.clock.now().getTime() - windowMs).toISOString())
    .delete()
}
