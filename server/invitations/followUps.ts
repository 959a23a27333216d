/*
 * Acting on invitations already sent: sending one again, reminding one player or a whole
 * session, and revoking, which kills every link sent for the invitation.
 */
import { randomUUID } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { loadSession } from '../sessions/rows'
import { invitationStatus, loadInvitation, queueInvitationMail } from './rows'
import { assertInvitable } from './invite'
import { invitationContext, rowOf } from './tracking'
import type { InvitationRow } from '../../shared/schemas/sessions'

/**
 * Sends the invitation again. A revoked invitation comes back with a new token id, so the
 * links sent before the revocation stay dead and only the new mail opens the session.
 */
export async function resendInvitation(
  ctx: AppContext,
  id: number,
  actor: Actor,
): Promise<InvitationRow> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const { inv, session, player, progress } = await invitationContext(trx, id)
    assertInvitable(session, now)
    if (!player.email) throw conflict('This player has no e-mail address any more')
    if (inv.completed_at) throw conflict('This player has already finished the session')
    const restored = inv.revoked_at ? { token_id: randomUUID(), revoked_at: null } : {}
    await trx('invitations')
      .where({ id })
      .update({ ...restored, last_sent_at: now.toISOString() })
    await queueInvitationMail(
      ctx,
      trx,
      'invitation',
      { ...inv, ...restored },
      session,
      player,
      progress,
    )
    await recordAudit(trx, now, actor, {
      action: inv.revoked_at ? 'invitation.restored' : 'invitation.resent',
      targetType: 'invitation',
      targetId: id,
    })
  })
  void ctx.outbox.deliverDue()
  return rowOf(ctx, id)
}

/** Queues one reminder and counts it; `auto` marks the one reminder the periodic job sends. */
export async function queueReminder(
  ctx: AppContext,
  trx: Knex,
  id: number,
  now: Date,
  auto: boolean,
): Promise<void> {
  const { inv, session, player, progress } = await invitationContext(trx, id)
  await queueInvitationMail(ctx, trx, 'reminder', inv, session, player, progress)
  await trx('invitations')
    .where({ id })
    .update({
      last_reminded_at: now.toISOString(),
      reminders_sent: inv.reminders_sent + 1,
      ...(auto ? { auto_reminded_at: now.toISOString() } : {}),
    })
}

export async function remindInvitation(
  ctx: AppContext,
  id: number,
  actor: Actor,
): Promise<InvitationRow> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const { inv, session } = await invitationContext(trx, id)
    assertInvitable(session, now)
    const status = invitationStatus(inv, session, now)
    if (status === 'revoked') throw conflict('This invitation was revoked; resend it to restore it')
    if (status === 'done') throw conflict('This player has already finished the session')
    await queueReminder(ctx, trx, id, now, false)
    await recordAudit(trx, now, actor, {
      action: 'invitation.reminded',
      targetType: 'invitation',
      targetId: id,
    })
  })
  void ctx.outbox.deliverDue()
  return rowOf(ctx, id)
}

/** Reminds every player of the session who has not finished and was not revoked. */
export async function remindSession(
  ctx: AppContext,
  sessionId: number,
  actor: Actor,
): Promise<number> {
  const now = ctx.clock.now()
  const reminded = await ctx.knex.transaction(async (trx) => {
    const session = await loadSession(trx, sessionId)
    assertInvitable(session, now)
    const ids = (
      (await trx('invitations')
        .where({ session_id: sessionId })
        .whereNull('revoked_at')
        .whereNull('completed_at')
        .orderBy('player_index')
        .select('id')) as { id: number }[]
    ).map((r) => r.id)
    for (const id of ids) await queueReminder(ctx, trx, id, now, false)
    if (ids.length)
      await recordAudit(trx, now, actor, {
        action: 'session.reminded',
        targetType: 'session',
        targetId: sessionId,
        details: { reminded: ids.length },
      })
    return ids.length
  })
  void ctx.outbox.deliverDue()
  return reminded
}

/** Every link sent for this invitation stops working at once: the token id they carry is gone. */
export async function revokeInvitation(
  ctx: AppContext,
  id: number,
  actor: Actor,
): Promise<InvitationRow> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const inv = await loadInvitation(trx, id)
    if (inv.revoked_at) return
    await trx('invitations').where({ id }).update({ token_id: null, revoked_at: now.toISOString() })
    await recordAudit(trx, now, actor, {
      action: 'invitation.revoked',
      targetType: 'invitation',
      targetId: id,
    })
  })
  return rowOf(ctx, id)
}
