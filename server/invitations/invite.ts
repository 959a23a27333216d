/*
 * Inviting players to an open session: each chosen player gets one invitation, its served plan
 * and its mail; a session may take mail only while it is open and before its deadline.
 */
import { randomUUID } from 'node:crypto'
import type { AppContext } from '../context'
import { conflict, validationFailed } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { fixServedPlans } from '../sessions/servedRecord'
import { loadSession, type SessionRow } from '../sessions/rows'
import { trialCountOf } from '../sessions/plans'
import { deadlineEnd } from '../auth/invitationTokens'
import { loadInvitation, queueInvitationMail, type InvitedPlayer } from './rows'
import { assertRoomFor, sessionRoom } from './throttle'
import type { InviteResult } from '../../shared/schemas/sessions'

/** Refuses mail for a session that is not open, or whose deadline has passed. */
export function assertInvitable(session: SessionRow, now: Date) {
  if (session.status !== 'open')
    throw conflict(
      session.status === 'draft'
        ? 'Open the session before inviting players: invitations go out only while it is open'
        : 'This session is closed; it takes no more invitations or reminders',
    )
  if (now >= deadlineEnd(session.deadline))
    throw conflict('The deadline has passed; move it later before sending mail')
}

const playerColumns = ['id', 'code', 'name', 'email', 'status'] as const

/**
 * Invites each chosen player once: a player already invited keeps the invitation (and the
 * plan) they have, so inviting twice, or two people inviting at once, yields one invitation.
 * A call whose new invitations would pass the session's hourly mail cap is refused whole, so
 * no one is left wondering which of the chosen players got a mail. The answer counts the mails
 * queued, not sent: they go out as the mail server takes them (the invitations list says which
 * still wait).
 */
export async function invitePlayers(
  ctx: AppContext,
  sessionId: number,
  playerIds: number[],
  actor: Actor,
): Promise<InviteResult> {
  const now = ctx.clock.now()
  const result = await ctx.knex.transaction(async (trx) => {
    const session = await loadSession(trx, sessionId)
    assertInvitable(session, now)
    const ids = [...new Set(playerIds)]
    const players: (InvitedPlayer & { status: string })[] = await trx('players')
      .whereIn('id', ids)
      .select(...playerColumns)
    const problems: string[] = []
    for (const id of ids) {
      const p = players.find((x) => x.id === id)
      if (!p || p.status === 'deleted') problems.push(`Player ${id} is not on the panel`)
      else if (p.status !== 'active') problems.push(`${p.code} is not active`)
      else if (!p.email) problems.push(`${p.code} has no e-mail address`)
    }
    if (problems.length)
      throw validationFailed('Some players cannot be invited', { fields: { playerIds: problems } })

    const existing = new Set(
      (
        (await trx('invitations')
          .where({ session_id: sessionId })
          .whereIn('player_id', ids)
          .select('player_id')) as { player_id: number }[]
      ).map((r) => r.player_id),
    )
    const fresh = ids.filter((id) => !existing.has(id)).length
    if (fresh)
      assertRoomFor(
        await sessionRoom(trx, sessionId, now, ctx.config.mailLimits.sessionMailsPerHour),
        fresh,
        now,
      )
    const [{ max }] = (await trx('invitations')
      .where({ session_id: sessionId })
      .max({ max: 'player_index' })) as { max: number | null }[]
    let nextIndex = max === null ? 0 : Number(max) + 1
    const trialCount = await trialCountOf(trx, session)
    let created = 0
    let mailsQueued = 0
    // Plans are dealt in invitation order, so balanced blocks fill up from the first player.
    for (const id of ids) {
      if (existing.has(id)) continue
      const player = players.find((x) => x.id === id)!
      const [invId] = await trx('invitations').insert({
        session_id: sessionId,
        player_id: id,
        player_index: nextIndex++,
        token_id: randomUUID(),
        invited_at: now.toISOString(),
        last_sent_at: now.toISOString(),
      })
      const inv = await loadInvitation(trx, invId as number)
      await fixServedPlans(trx, session, [inv], now)
      if (
        await queueInvitationMail(ctx, trx, 'invitation', inv, session, player, {
          answered: 0,
          trialCount,
        })
      )
        mailsQueued++
      created++
    }
    if (created > 0)
      await recordAudit(trx, now, actor, {
        action: 'session.players_invited',
        targetType: 'session',
        targetId: sessionId,
        details: { created, existing: existing.size },
      })
    return { created, existing: existing.size, mailsQueued }
  })
  void ctx.outbox.deliverDue()
  return result
}
