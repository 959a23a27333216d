/*
 * Acting on invitations already sent: sending one again, reminding one player or a whole
 * session, and revoking, which kills every link sent for the invitation. Mail goes only as
 * often as throttle.ts allows, checked in the transaction that queues it.
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
import {
  assertMayRemind,
  assertMayResend,
  assertRoomFor,
  assertSomeRoom,
  nextMailAt,
  sessionRoom,
} from './throttle'
import type { InvitationRow, RemindAllResult } from '../../shared/schemas/sessions'

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
    // A revoke and restore sends mail too, so it waits like any resend.
    assertMayResend(inv, now)
    assertRoomFor(
      await sessionRoom(trx, session.id, now, ctx.config.mailLimits.sessionMailsPerHour),
      1,
      now,
    )
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
    assertMayRemind(inv, ctx.config.mailLimits.reminderGapMs, now)
    assertRoomFor(
      await sessionRoom(trx, session.id, now, ctx.config.mailLimits.sessionMailsPerHour),
      1,
      now,
    )
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

/**
 * Reminds every player of the session who has not finished and was not revoked, except those
 * whose last mail went within the reminder gap. When the hourly cap leaves room for only some,
 * the first in player order are reminded and the rest are counted as held back: each reminder
 * is whole, and a later call picks up the others. With no room at all the call is refused.
 */
export async function remindSession(
  ctx: AppContext,
  sessionId: number,
  actor: Actor,
): Promise<RemindAllResult> {
  const now = ctx.clock.now()
  const { reminderGapMs, sessionMailsPerHour } = ctx.config.mailLimits
  const result = await ctx.knex.transaction(async (trx) => {
    const session = await loadSession(trx, sessionId)
    assertInvitable(session, now)
    const open: { id: number; last_sent_at: string; last_reminded_at: string | null }[] = await trx(
      'invitations',
    )
      .where({ session_id: sessionId })
      .whereNull('revoked_at')
      .whereNull('completed_at')
      .orderBy('player_index')
      .select('id', 'last_sent_at', 'last_reminded_at')
    const due = open.filter((r) => !nextMailAt(r, reminderGapMs, now))
    const room = await sessionRoom(trx, sessionId, now, sessionMailsPerHour)
    assertSomeRoom(room, due.length, now)
    const sent = due.slice(0, room.free)
    for (const { id } of sent) await queueReminder(ctx, trx, id, now, false)
    const heldBack = due.length - sent.length
    const counts = { reminded: sent.length, skippedRecent: open.length - due.length, heldBack }
    if (sent.length)
      await recordAudit(trx, now, actor, {
        action: 'session.reminded',
        targetType: 'session',
        targetId: sessionId,
        details: counts,
      })
    // When the next of them fit: all, or as many as one hour allows.
    const after = heldBack
      ? (await sessionRoom(trx, sessionId, now, sessionMailsPerHour)).fitsAt(
          Math.min(heldBack, sessionMailsPerHour),
        )
      : null
    return {
      ...counts,
      reminderGapHours: reminderGapMs / 3_600_000,
      moreAfter: after?.toISOString() ?? null,
    }
  })
  if (result.reminded) void ctx.outbox.deliverDue()
  return result
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
