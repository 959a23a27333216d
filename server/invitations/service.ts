import { fixServedPlans } from '../sessions/servedRecord'
import { randomUUID } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, validationFailed } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { loadSession, type SessionRow } from '../sessions/rows'
import { trialCountOf } from '../sessions/plans'
import { deadlineEnd } from '../auth/invitationTokens'
import {
  answeredCounts,
  invitationStatus,
  loadInvitation,
  queueInvitationMail,
  toInvitationRow,
  type InvitationDbRow,
  type InvitedPlayer,
} from './rows'
import type { InvitationRow, InviteResult } from '../../shared/schemas/sessions'

function assertInvitable(session: SessionRow, now: Date) {
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
    const [{ max }] = (await trx('invitations')
      .where({ session_id: sessionId })
      .max({ max: 'player_index' })) as { max: number | null }[]
    let nextIndex = max === null ? 0 : Number(max) + 1
    const trialCount = await trialCountOf(trx, session)
    let created = 0
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
      await queueInvitationMail(ctx, trx, 'invitation', inv, session, player, {
        answered: 0,
        trialCount,
      })
      created++
    }
    if (created > 0)
      await recordAudit(trx, now, actor, {
        action: 'session.players_invited',
        targetType: 'session',
        targetId: sessionId,
        details: { created, existing: existing.size },
      })
    return { created, existing: existing.size }
  })
  void ctx.outbox.deliverDue()
  return result
}

export async function listInvitations(
  knex: Knex,
  sessionId: number,
  now: Date,
  personal: boolean,
): Promise<InvitationRow[]> {
  const session = await loadSession(knex, sessionId)
  const rows: (InvitationDbRow & { code: string; name: string | null; email: string | null })[] =
    await knex('invitations as i')
      .join('players as p', 'p.id', 'i.player_id')
      .where('i.session_id', sessionId)
      .orderBy('i.player_index')
      .select('i.*', 'p.code', 'p.name', 'p.email')
  const answered = await answeredCounts(
    knex,
    rows.map((r) => r.id),
  )
  const trialCount = await trialCountOf(knex, session)
  return rows.map((r) =>
    toInvitationRow(r, { id: r.player_id, code: r.code, name: r.name, email: r.email }, session, {
      now,
      answered: answered.get(r.id) ?? 0,
      trialCount,
      personal,
    }),
  )
}

async function invitationContext(trx: Knex, id: number) {
  const inv = await loadInvitation(trx, id)
  const session = await loadSession(trx, inv.session_id)
  const player: InvitedPlayer = await trx('players')
    .where({ id: inv.player_id })
    .first('id', 'code', 'name', 'email')
  const answered = (await answeredCounts(trx, [inv.id])).get(inv.id) ?? 0
  const trialCount = await trialCountOf(trx, session)
  return { inv, session, player, progress: { answered, trialCount } }
}

async function rowOf(ctx: AppContext, id: number): Promise<InvitationRow> {
  const { inv, session, player, progress } = await invitationContext(ctx.knex, id)
  return toInvitationRow(inv, player, session, {
    now: ctx.clock.now(),
    ...progress,
    personal: true,
  })
}

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

async function queueReminder(
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

export { queueReminder }
