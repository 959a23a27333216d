/*
 * Opening and closing a session: a draft opens once its design is possible, an open session
 * closes, and neither step goes back.
 */
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { assertPossible, reviewDesign } from './designReview'
import { designOf, loadSession, type SessionRow } from './rows'
import { getSession } from './read'
import type { SessionDetail } from '../../shared/schemas/sessions'

interface Step {
  from: SessionRow['status']
  to: SessionRow['status']
  stamp: 'opened_at' | 'closed_at'
  action: string
  /** Why the step cannot be taken from each other status. */
  refusals: Partial<Record<SessionRow['status'], string>>
  check?: (trx: Knex, row: SessionRow, now: Date) => Promise<void>
}

async function step(ctx: AppContext, id: number, actor: Actor, s: Step): Promise<SessionDetail> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const row = await loadSession(trx, id)
    if (row.status !== s.from) throw conflict(s.refusals[row.status] ?? 'Not possible now')
    await s.check?.(trx, row, now)
    await trx('sessions')
      .where({ id })
      .update({ status: s.to, [s.stamp]: now.toISOString(), updated_at: now.toISOString() })
    await recordAudit(trx, now, actor, { action: s.action, targetType: 'session', targetId: id })
  })
  return getSession(ctx.knex, id, now)
}

export const openSession = (ctx: AppContext, id: number, actor: Actor) =>
  step(ctx, id, actor, {
    from: 'draft',
    to: 'open',
    stamp: 'opened_at',
    action: 'session.opened',
    refusals: {
      open: 'This session is already open',
      closed: 'A closed session cannot open again',
    },
    check: async (trx, row, now) =>
      assertPossible(await reviewDesign(trx, { ...designOf(row), deadline: row.deadline }, now)),
  })

export const closeSession = (ctx: AppContext, id: number, actor: Actor) =>
  step(ctx, id, actor, {
    from: 'open',
    to: 'closed',
    stamp: 'closed_at',
    action: 'session.closed',
    refusals: {
      closed: 'This session is already closed',
      draft: 'Only an open session can be closed',
    },
  })
