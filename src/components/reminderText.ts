// The words beside the reminder and resend buttons: when a player was last mailed, when the next
// mail may go, and what "remind everyone" did. The server decides; these only say it.
import type { InvitationRow, RemindAllResult } from '@shared/schemas/sessions'
import { when } from './sessionFormat'

/** The time still to come, or null when it has passed (the button may be used again). */
export function pending(iso: string | null, now: number): string | null {
  return iso && Date.parse(iso) > now ? iso : null
}

/** "2, last 01/12/2026, 21:00:00" or a dash. */
export function remindersCell(r: InvitationRow): string {
  return r.remindersSent && r.lastRemindedAt
    ? `${r.remindersSent}, last ${when(r.lastRemindedAt)}`
    : '—'
}

export const nextReminderLine = (at: string) => `Next reminder after ${when(at)}`

export const remindWaitTip = (at: string) =>
  `This player was mailed recently; the next reminder can go after ${when(at)}.`

export const resendWaitTip = (at: string) =>
  `This player was mailed a few minutes ago; the invitation can be sent again after ${when(at)}.`

/** "5 reminded, 2 skipped (invited or reminded in the last 12 h)", and what the cap held back. */
export function remindAllSummary(r: RemindAllResult): string {
  const parts = [`${r.reminded} reminded`]
  if (r.skippedRecent)
    parts.push(
      `${r.skippedRecent} skipped (invited or reminded in the last ${r.reminderGapHours} h)`,
    )
  if (r.heldBack)
    parts.push(
      `${r.heldBack} held back by this session's hourly mail limit` +
        (r.moreAfter ? `; they can go after ${when(r.moreAfter)}` : ''),
    )
  return parts.join(', ')
}

/** The earliest next reminder when no one not done may be reminded now, else null. */
export function everyoneWaitsUntil(rows: InvitationRow[], now: number): string | null {
  const waiting = rows.filter((r) => ['invited', 'opened', 'in_progress'].includes(r.status))
  if (!waiting.length) return null
  const next = waiting.map((r) => pending(r.nextReminderAt, now))
  if (next.some((n) => n === null)) return null
  return (next as string[]).reduce((a, b) => (Date.parse(a) <= Date.parse(b) ? a : b))
}
