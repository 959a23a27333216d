/*
 * Opening and closing a session: a draft opens once its design is possible, an open session
 * closes, and neither step goes back.
 */
import type { AppContext } from '../context'
import { conflict } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { assertPossible, reviewDesign } from './designReview'
import { designOf, loadSession } from './rows'
import { getSession } from './read'
import type { SessionDetail } from '../../shared/schemas/sessions'

export async function openSession(
  ctx: AppContext,
  id: number,
  actor: Actor,
): Promise<SessionDetail> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const row = await loadSession(trx, id)
    if (row.status !== 'draft')
      throw conflict(
        row.status === 'open'
          ? 'This session is already open'
          : 'A closed session cannot open again',
      )
    assertPossible(await reviewDesign(trx, { ...designOf(row), deadline: row.deadline }, now))
    await trx('sessions')
      .where({ id })
      .update({ status: 'open', opened_at: now.toISOString(), updated_at: now.toISOString() })
    await recordAudit(trx, now, actor, {
      action: 'session.opened',
      targetType: 'session',
      targetId: id,
    })
  })
  return getSession(ctx.knex, id, now)
}

export async function closeSession(
  ctx: AppContext,
  id: number,
  actor: Actor,
): Promise<SessionDetail> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const row = await loadSession(trx, id)
    if (row.status !== 'open')
      throw conflict(
        row.status === 'closed'
          ? 'This session is already closed'
          : 'Only an open session can be closed',
      )
    await trx('sessions')
      .where({ id })
      .update({ status: 'closed', closed_at: now.toISOString(), updated_at: now.toISOString() })
    await recordAudit(trx, now, actor, {
      action: 'session.closed',
      targetType: 'session',
      targetId: id,
    })
  })
  return getSession(ctx.knex, id, now)
}
