/*
 * Following a session's invitations: the list with each player's progress and mail, and one
 * invitation with what the mail and the row about it need.
 */
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { loadSession } from '../sessions/rows'
import { trialCountOf } from '../sessions/plans'
import {
  answeredCounts,
  loadInvitation,
  toInvitationRow,
  type InvitationDbRow,
  type InvitedPlayer,
} from './rows'
import { invitationMailState, sessionMailStates } from './mailState'
import {
  checkRows,
  hasHeadphoneCheck,
  recordOf,
  sessionHeadphoneRecords,
  type HeadphoneRecord,
} from '../player/headphoneRecord'
import type {
  HeadphoneCheckState,
  InvitationRow,
  SessionFormat,
} from '../../shared/schemas/sessions'

/** The check's standing for staff: the outcome only, never the tones or the player's picks. */
function checkState(
  format: SessionFormat,
  record: HeadphoneRecord | undefined,
): HeadphoneCheckState | null {
  if (!hasHeadphoneCheck(format)) return null
  return record?.status ?? 'not_done'
}

/**
 * The session's invitations in player order; each says when its next reminder may go and where
 * its latest mail stands.
 */
export async function listInvitations(
  ctx: AppContext,
  sessionId: number,
  now: Date,
  personal: boolean,
): Promise<InvitationRow[]> {
  const { knex } = ctx
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
  const checks = await sessionHeadphoneRecords(knex, sessionId)
  const mails = await sessionMailStates(knex, sessionId)
  return rows.map((r) => ({
    ...toInvitationRow(
      r,
      { id: r.player_id, code: r.code, name: r.name, email: r.email },
      session,
      {
        now,
        answered: answered.get(r.id) ?? 0,
        trialCount,
        personal,
        reminderGapMs: ctx.config.mailLimits.reminderGapMs,
      },
    ),
    headphoneCheck: checkState(session.format, checks.get(r.id)),
    mail: mails.get(r.id) ?? null,
  }))
}

/** One invitation with its session, player and progress: what its mail and its row need. */
export async function invitationContext(trx: Knex, id: number) {
  const inv = await loadInvitation(trx, id)
  const session = await loadSession(trx, inv.session_id)
  const player: InvitedPlayer = await trx('players')
    .where({ id: inv.player_id })
    .first('id', 'code', 'name', 'email')
  const answered = (await answeredCounts(trx, [inv.id])).get(inv.id) ?? 0
  const trialCount = await trialCountOf(trx, session)
  return { inv, session, player, progress: { answered, trialCount } }
}

/** The row staff see for one invitation, as of now. */
export async function rowOf(ctx: AppContext, id: number): Promise<InvitationRow> {
  const { inv, session, player, progress } = await invitationContext(ctx.knex, id)
  return {
    ...toInvitationRow(inv, player, session, {
      now: ctx.clock.now(),
      ...progress,
      personal: true,
      reminderGapMs: ctx.config.mailLimits.reminderGapMs,
    }),
    headphoneCheck: checkState(session.format, recordOf(await checkRows(ctx.knex, inv.id))),
    mail: await invitationMailState(ctx.knex, inv.id),
  }
}
