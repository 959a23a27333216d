/*
 * Mail that belongs to a session (invitations, resends, reminders) waits for as long as the
 * session takes mail: open, and before the end of its deadline day, when the link in it stops
 * working. Once the session is over, mail that has not gone out ends as failed with the reason,
 * so nobody is left believing it went and no player gets a link that no longer opens.
 */
import type { Knex } from 'knex'
import { deadlineEnd } from '../auth/invitationTokens'

export const SESSION_CLOSED_REASON = 'The session closed before the mail server took this mail'
export const DEADLINE_PASSED_REASON =
  "The session's deadline passed before the mail server took this mail"

/** Why mail of this session may no longer go, or null while it may. */
export function sessionEndReason(
  session: { status: string; deadline: string } | undefined,
  now: Date,
): string | null {
  if (!session || session.status !== 'open') return SESSION_CLOSED_REASON
  if (now >= deadlineEnd(session.deadline)) return DEADLINE_PASSED_REASON
  return null
}

/**
 * The sessions whose mail may go now, as a subquery for the claim. `deadline >= today` is the
 * same test as `now < deadlineEnd(deadline)`: deadlines are whole days, ending at midnight UTC.
 */
export function sessionsTakingMail(knex: Knex, now: Date): Knex.QueryBuilder {
  return knex('sessions')
    .select('id')
    .where('status', 'open')
    .where('deadline', '>=', now.toISOString().slice(0, 10))
}

/** Ends the waiting mail of every session that is over; returns how many mails it ended. */
export async function endMailOfEndedSessions(knex: Knex, now: Date): Promise<number> {
  const sessions: { session_id: number; status: string | null; deadline: string | null }[] =
    await knex('outbox as o')
      .leftJoin('sessions as s', 's.id', 'o.session_id')
      .where('o.status', 'pending')
      .whereNotNull('o.session_id')
      .distinct('o.session_id', 's.status', 's.deadline')
  let ended = 0
  for (const s of sessions) {
    const reason = sessionEndReason(
      s.status === null ? undefined : { status: s.status, deadline: s.deadline ?? '' },
      now,
    )
    if (!reason) continue
    ended += await knex('outbox')
      .where({ session_id: s.session_id, status: 'pending' })
      .update({ status: 'failed', last_error: reason, next_attempt_at: null })
  }
  return ended
}
