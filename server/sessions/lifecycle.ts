/*
 * Opening and closing a session: a draft opens once its design is possible, an open session
 * closes, and neither step goes back.
 */
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, validationFailed } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { assertPossible, reviewDesign } from './designReview'
import { designOf, loadSession, playerWordsOf, type SessionRow } from './rows'
import { getSession } from './read'
import { nextRevision } from '../lib/revision'
import type { SessionDetail } from '../../shared/schemas/sessions'

interface Step {
  from: SessionRow['status']
  to: SessionRow['status']
  stamp: 'opened_at' | 'closed_at'
  action: string
  /** Why the step cannot be taken from each other status. */
  refusals: Partial<Record<SessionRow['status'], string>>
  /** Refuses by throwing; what it returns goes into the step's audit entry. */
  check?: (trx: Knex, row: SessionRow, now: Date) => Promise<Record<string, unknown> | void>
}

async function step(ctx: AppContext, id: number, actor: Actor, s: Step): Promise<SessionDetail> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const row = await loadSession(trx, id)
    if (row.status !== s.from) throw conflict(s.refusals[row.status] ?? 'Not possible now')
    const details = (await s.check?.(trx, row, now)) ?? undefined
    await trx('sessions')
      .where({ id })
      .update({
        status: s.to,
        [s.stamp]: now.toISOString(),
        updated_at: now.toISOString(),
        // A form opened before the step would otherwise save over the new status's rules.
        ...nextRevision(trx),
      })
    await recordAudit(trx, now, actor, {
      action: s.action,
      targetType: 'session',
      targetId: id,
      ...(details ? { details } : {}),
    })
  })
  return getSession(ctx.knex, id, now)
}

export interface OpenChoices {
  /** The designer accepts that recipes served twice from one take could be paired by files. */
  acceptSameTake?: boolean
}

export const openSession = (ctx: AppContext, id: number, actor: Actor, choices: OpenChoices = {}) =>
  step(ctx, id, actor, {
    from: 'draft',
    to: 'open',
    stamp: 'opened_at',
    action: 'session.opened',
    refusals: {
      open: 'This session is already open',
      closed: 'A closed session cannot open again',
    },
    check: async (trx, row, now) => {
      const design = { ...designOf(row), deadline: row.deadline, playerWords: playerWordsOf(row) }
      const review = await reviewDesign(trx, design, now)
      assertPossible(review)
      if (review.sameTake.length === 0) return { sameTake: false }
      if (!choices.acceptSameTake)
        throw validationFailed('Accept the warning about single takes to open this session', {
          fields: { acceptSameTake: review.sameTake },
        })
      await trx('sessions')
        .where({ id: row.id })
        .update({ same_take_accepted_at: now.toISOString(), same_take_accepted_by: actor.email })
      return { sameTake: true, sameTakeWarnings: review.sameTake }
    },
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
