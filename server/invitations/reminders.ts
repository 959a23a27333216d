import type { AppContext } from '../context'
import { deadlineEnd } from '../auth/invitationTokens'
import { recordAudit } from '../audit/service'
import { queueReminder } from './followUps'
import { nextMailAt, sessionRoom } from './throttle'
import type { SessionRow } from '../sessions/rows'

const DAY = 24 * 60 * 60 * 1000

/**
 * Sends the one automatic reminder to every unfinished invitation whose session is within its
 * `reminder_days_before` of the deadline. Safe to run as often as wanted: each invitation is
 * reminded this way once. Players invited after the reminder time have a fresh mail already.
 * A player whose last mail went within the reminder gap waits until the gap has passed, and a
 * session at its hourly mail cap sends the rest on a later run.
 */
export async function sendDueReminders(ctx: AppContext): Promise<number> {
  const now = ctx.clock.now()
  const { reminderGapMs, sessionMailsPerHour } = ctx.config.mailLimits
  const sessions: SessionRow[] = await ctx
    .knex('sessions')
    .where({ status: 'open' })
    .whereNotNull('reminder_days_before')
  let total = 0
  for (const s of sessions) {
    const end = deadlineEnd(s.deadline)
    const remindAt = new Date(end.getTime() - (s.reminder_days_before as number) * DAY)
    if (now < remindAt || now >= end) continue
    const sent = await ctx.knex.transaction(async (trx) => {
      const waiting: { id: number; last_sent_at: string; last_reminded_at: string | null }[] =
        await trx('invitations')
          .where({ session_id: s.id })
          .whereNull('revoked_at')
          .whereNull('completed_at')
          .whereNull('auto_reminded_at')
          .where('invited_at', '<', remindAt.toISOString())
          .orderBy('player_index')
          .select('id', 'last_sent_at', 'last_reminded_at')
      const due = waiting.filter((r) => !nextMailAt(r, reminderGapMs, now))
      const room = await sessionRoom(trx, s.id, now, sessionMailsPerHour)
      const ids = due.slice(0, room.free).map((r) => r.id)
      for (const id of ids) await queueReminder(ctx, trx, id, now, true)
      if (ids.length)
        await recordAudit(
          trx,
          now,
          { userId: null, email: null },
          {
            action: 'session.auto_reminded',
            targetType: 'session',
            targetId: s.id,
            details: { reminded: ids.length },
          },
        )
      return ids.length
    })
    total += sent
  }
  if (total) void ctx.outbox.deliverDue()
  return total
}

/** The periodic job beside the outbox timer; returns its stop function. */
export function startReminderTimer(ctx: AppContext, everyMs: number): () => void {
  let running = false
  const tick = async () => {
    if (running) return
    running = true
    try {
      await sendDueReminders(ctx)
    } catch (err) {
      ctx.logger.error({ err }, 'reminder run failed')
    } finally {
      running = false
    }
  }
  void tick()
  const timer = setInterval(() => void tick(), everyMs)
  return () => clearInterval(timer)
}
