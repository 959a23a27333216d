import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { notFound } from '../errors'
import { deadlineEnd, signInvitation } from '../auth/invitationTokens'
import { firstNameOf, invitationMail, type InvitationMailKind } from './mail'
import { logSessionMail, nextMailAt, RESEND_GAP_MS } from './throttle'
import type { SessionRow } from '../sessions/rows'
import type { InvitationRow, InvitationStatus } from '../../shared/schemas/sessions'

export interface InvitationDbRow {
  id: number
  session_id: number
  player_id: number
  player_index: number
  token_id: string | null
  invited_at: string
  last_sent_at: string
  opened_at: string | null
  started_at: string | null
  completed_at: string | null
  revoked_at: string | null
  last_reminded_at: string | null
  reminders_sent: number
  auto_reminded_at: string | null
}

export interface InvitedPlayer {
  id: number
  code: string
  name: string | null
  email: string | null
}

/**
 * Derived from the times rather than stored, so a status can never disagree with them: the
 * deadline passing or the session closing turns an unfinished invitation into "expired".
 */
export function invitationStatus(
  inv: InvitationDbRow,
  session: Pick<SessionRow, 'deadline' | 'status'>,
  now: Date,
): InvitationStatus {
  if (inv.revoked_at) return 'revoked'
  if (inv.completed_at) return 'done'
  if (session.status === 'closed' || now >= deadlineEnd(session.deadline)) return 'expired'
  if (inv.started_at) return 'in_progress'
  if (inv.opened_at) return 'opened'
  return 'invited'
}

export async function loadInvitation(db: Knex, id: number): Promise<InvitationDbRow> {
  const row: InvitationDbRow | undefined = await db('invitations').where({ id }).first()
  if (!row) throw notFound('Invitation')
  return row
}

export async function answeredCounts(db: Knex, invitationIds: number[]) {
  if (invitationIds.length === 0) return new Map<number, number>()
  const rows: { invitation_id: number; n: number }[] = await db('answers')
    .whereIn('invitation_id', invitationIds)
    .groupBy('invitation_id')
    .select('invitation_id')
    .count({ n: '*' })
  return new Map(rows.map((r) => [r.invitation_id, Number(r.n)]))
}

export function toInvitationRow(
  inv: InvitationDbRow,
  player: InvitedPlayer,
  session: SessionRow,
  extra: {
    now: Date
    answered: number
    trialCount: number
    personal: boolean
    reminderGapMs: number
  },
): InvitationRow {
  const next = (gapMs: number) => nextMailAt(inv, gapMs, extra.now)?.toISOString() ?? null
  return {
    id: inv.id,
    sessionId: inv.session_id,
    playerId: inv.player_id,
    playerCode: player.code,
    playerName: extra.personal ? player.name : null,
    playerEmail: extra.personal ? player.email : null,
    status: invitationStatus(inv, session, extra.now),
    invitedAt: inv.invited_at,
    lastSentAt: inv.last_sent_at,
    openedAt: inv.opened_at,
    startedAt: inv.started_at,
    completedAt: inv.completed_at,
    revokedAt: inv.revoked_at,
    lastRemindedAt: inv.last_reminded_at,
    remindersSent: inv.reminders_sent,
    nextReminderAt: next(extra.reminderGapMs),
    nextResendAt: next(RESEND_GAP_MS),
    answered: extra.answered,
    trialCount: extra.trialCount,
  }
}

export function invitationUrl(ctx: AppContext, inv: InvitationDbRow, session: SessionRow): string {
  const token = signInvitation(
    ctx.config.jwtSecret,
    ctx.clock,
    { jti: inv.token_id!, sub: inv.id },
    session.deadline,
  )
  return `${ctx.config.publicUrl}/p/${token}`
}

/**
 * Queues the personal mail inside the caller's transaction; the link is signed afresh. Each mail
 * counts against the session's hourly cap, which the caller checked in the same transaction.
 * Says whether a mail was queued (a player without an address gets none).
 */
export async function queueInvitationMail(
  ctx: AppContext,
  trx: Knex,
  kind: InvitationMailKind,
  inv: InvitationDbRow,
  session: SessionRow,
  player: InvitedPlayer,
  progress: { answered: number; trialCount: number },
): Promise<boolean> {
  if (!player.email) return false
  const mail = invitationMail({
    kind,
    firstName: firstNameOf(player.name),
    playerTitle: session.player_title,
    format: session.format,
    playerMessage: session.player_message,
    deadline: session.deadline,
    url: invitationUrl(ctx, inv, session),
    ...progress,
  })
  // Tied to its session and invitation: it waits for the mail server for as long as the
  // session is open, and the invitations list shows where it stands.
  await ctx.outbox.enqueue(
    {
      to: player.email,
      kind: kind === 'reminder' ? 'session_reminder' : 'session_invitation',
      sessionId: session.id,
      invitationId: inv.id,
      ...mail,
    },
    trx,
  )
  await logSessionMail(trx, session.id, kind, ctx.clock.now())
  return true
}
