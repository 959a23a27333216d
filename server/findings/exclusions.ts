import type { AppContext } from '../context'
import { conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { loadSession } from '../sessions/rows'
import { HEADPHONE_EXCLUSION_REASON, screeningOf } from './headphoneExclusions'
import type { ExcludePlayerBody, IncludePlayerBody } from '../../shared/schemas/findings'

/*
 * Setting a player aside is the analyst's judgement: the reliability flag only advises. The one
 * default is the failed headphone check (headphoneExclusions.ts), which the analyst may undo
 * and redo the same way. Both directions need a reason and land in the audit log with it, in
 * the same transaction as the change, so the record of who was left out and why cannot drift.
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
    const session = await loadSession(trx, sessionId)
    const playerId = await invitedPlayer(trx, sessionId, body.playerCode)
    const existing = await trx('exclusions')
      .where({ session_id: sessionId, player_id: playerId })
      .first('id')
    if (existing) throw conflict(`${body.playerCode} is already excluded from these findings`)
    const screening = await screeningOf(trx, session, playerId)
    if (screening.failed && !screening.includedBack)
      throw conflict(
        `${body.playerCode} is already excluded from these findings (${HEADPHONE_EXCLUSION_REASON})`,
      )
    if (screening.failed) {
      // Taken back in earlier: undoing that lets the headphone rule leave them out again.
      await trx('headphone_inclusions')
        .where({ session_id: sessionId, player_id: playerId })
        .delete()
      await recordAudit(trx, now, actor, {
        action: 'findings.player_excluded',
        targetType: 'session',
        targetId: sessionId,
        details: {
          playerCode: body.playerCode,
          reason: body.reason,
          rule: HEADPHONE_EXCLUSION_REASON,
        },
      })
      return
    }
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
    const session = await loadSession(trx, sessionId)
    const playerId = await invitedPlayer(trx, sessionId, playerCode)
    const removed = await trx('exclusions')
      .where({ session_id: sessionId, player_id: playerId })
      .delete()
    if (removed === 0) {
      const screening = await screeningOf(trx, session, playerId)
      if (!screening.failed || screening.includedBack)
        throw conflict(`${playerCode} is not excluded from these findings`)
      await trx('headphone_inclusions').insert({
        session_id: sessionId,
        player_id: playerId,
        reason: body.reason,
        created_by: actor.userId,
        created_at: now.toISOString(),
      })
      await recordAudit(trx, now, actor, {
        action: 'findings.player_included',
        targetType: 'session',
        targetId: sessionId,
        details: { playerCode, reason: body.reason, rule: HEADPHONE_EXCLUSION_REASON },
      })
      return
    }
    await recordAudit(trx, now, actor, {
      action: 'findings.player_included',
      targetType: 'session',
      targetId: sessionId,
      details: { playerCode, reason: body.reason },
    })
  })
}
