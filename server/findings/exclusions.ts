import type { AppContext } from '../context'
import { conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { loadSession } from '../sessions/rows'
import type { ExcludePlayerBody, IncludePlayerBody } from '../../shared/schemas/findings'

/*
 * Setting a player aside is the analyst's judgement, never automatic: the reliability flag
 * only advises. Both directions need a reason and land in the audit log with it, in the same
 * transaction as the change, so the record of who was left out and why cannot drift.
 */

async function invitedPlayer(
  trx: AppContext['knex'],
  sessionId: number,
  playerCode: string,
): Promise<number> {
  const row: { player_id: number } | undefined = await trx('invitations as i')
    .join('players as p', 'p.id', 'i.player_id')
    .where({ 'i.session_id': sessionId, 'p.code': playerCode })
    .first('i.player_id')
  if (!row) throw notFound('A player with that code in this session')
  return row.player_id
}

export async function excludePlayer(
  ctx: AppContext,
  sessionId: number,
  body: ExcludePlayerBody,
  actor: Actor,
): Promise<void> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    await loadSession(trx, sessionId)
    const playerId = await invitedPlayer(trx, sessionId, body.playerCode)
    const existing = await trx('exclusions')
      .where({ session_id: sessionId, player_id: playerId })
      .first('id')
    if (existing) throw conflict(`${body.playerCode} is already excluded from these findings`)
    await trx('exclusions').insert({
      session_id: sessionId,
      player_id: playerId,
      reason: body.reason,
      created_by: actor.userId,
      created_at: now.toISOString(),
    })
    await recordAudit(trx, now, actor, {
      action: 'findings.player_excluded',
      targetType: 'session',
      targetId: sessionId,
      details: { playerCode: body.playerCode, reason: body.reason },
    })
  })
}

export async function includePlayer(
  ctx: AppContext,
  sessionId: number,
  playerCode: string,
  body: IncludePlayerBody,
  actor: Actor,
): Promise<void> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    await loadSession(trx, sessionId)
    const playerId = await invitedPlayer(trx, sessionId, playerCode)
    const removed = await trx('exclusions')
      .where({ session_id: sessionId, player_id: playerId })
      .delete()
    if (removed === 0) throw conflict(`${playerCode} is not excluded from these findings`)
    await recordAudit(trx, now, actor, {
      action: 'findings.player_included',
      targetType: 'session',
      targetId: sessionId,
      details: { playerCode, reason: body.reason },
    })
  })
}
