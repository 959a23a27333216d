/*
 * How often invitation mail may go. To one player: a reminder no sooner than the configured gap
 * after their last mail (invitation or reminder), a resend no sooner than RESEND_GAP_MS. From one
 * session: at most Config.mailLimits.sessionMailsPerHour invitations and reminders in any hour.
 * Callers check inside the transaction that queues the mail; SQLite runs one writer at a time,
 * so two calls at once cannot both pass on the same reading.
 */
import type { Knex } from 'knex'
import { AppError } from '../errors'
import type { InvitationDbRow } from './rows'

const HOUR = 3_600_000

/**
 * A resend waits ten minutes after the player's last mail: clicking cannot fill an inbox, and
 * an address corrected after a typo still gets its invitation within minutes, not the next day.
 */
export const RESEND_GAP_MS = 10 * 60_000

type MailTimes = Pick<InvitationDbRow, 'last_sent_at' | 'last_reminded_at'>

/** The latest mail this invitation sent: the invitation itself (or its resend) or a reminder. */
export function lastMail(inv: MailTimes): { at: Date; kind: 'invitation' | 'reminder' } {
  const sent = Date.parse(inv.last_sent_at)
  const reminded = inv.last_reminded_at ? Date.parse(inv.last_reminded_at) : -Infinity
  return reminded > sent
    ? { at: new Date(reminded), kind: 'reminder' }
    : { at: new Date(sent), kind: 'invitation' }
}

/** When the next mail may go `gapMs` after the last one, or null when it may go now. */
export function nextMailAt(inv: MailTimes, gapMs: number, now: Date): Date | null {
  const next = new Date(lastMail(inv).at.getTime() + gapMs)
  return next > now ? next : null
}

/** "14:05 UTC" today, "2026-12-02 14:05 UTC" on another day; rounded up, so it is never early. */
export function utcTime(at: Date, now: Date): string {
  const up = new Date(Math.ceil(at.getTime() / 60_000) * 60_000).toISOString()
  const day = up.slice(0, 10) === now.toISOString().slice(0, 10) ? '' : `${up.slice(0, 10)} `
  return `${day}${up.slice(11, 16)} UTC`
}

function ago(ms: number): string {
  const minutes = Math.floor(ms / 60_000)
  if (minutes < 1) return 'less than a minute ago'
  if (minutes < 120) return `${minutes} minute${minutes === 1 ? '' : 's'} ago`
  return `${Math.floor(minutes / 60)} hours ago`
}

const tooSoon = (message: string) => new AppError('rate_limited', message)

/** Refuses a reminder sooner than the gap after this player's last mail; says when it can go. */
export function assertMayRemind(inv: MailTimes, gapMs: number, now: Date): void {
  const next = nextMailAt(inv, gapMs, now)
  if (!next) return
  const last = lastMail(inv)
  const went = last.kind === 'reminder' ? 'A reminder' : 'The invitation'
  throw tooSoon(
    `${went} went to this player ${ago(now.getTime() - last.at.getTime())}; the next reminder can go after ${utcTime(next, now)}.`,
  )
}

/** Refuses a resend sooner than RESEND_GAP_MS after this player's last mail. */
export function assertMayResend(inv: MailTimes, now: Date): void {
  const next = nextMailAt(inv, RESEND_GAP_MS, now)
  if (!next) return
  const last = lastMail(inv)
  const went = last.kind === 'reminder' ? 'A reminder' : 'The invitation'
  throw tooSoon(
    `${went} went to this player ${ago(now.getTime() - last.at.getTime())}; the invitation can be sent again after ${utcTime(next, now)}.`,
  )
}

export interface SessionRoom {
  limit: number
  /** Mails the session queued in the last hour. */
  used: number
  /** How many more may go now (Infinity when the cap is off). */
  free: number
  /** When `n` more will fit, or null when `n` is more than one hour allows. */
  fitsAt(n: number): Date | null
}

/** What the session's hourly cap leaves; prunes the session's rows that left the window. */
export async function sessionRoom(
  trx: Knex,
  sessionId: number,
  now: Date,
  limit: number,
): Promise<SessionRoom> {
  const since = new Date(now.getTime() - HOUR).toISOString()
  await trx('session_mail_log')
    .where({ session_id: sessionId })
    .where('queued_at', '<=', since)
    .delete()
  if (limit <= 0) return { limit, used: 0, free: Infinity, fitsAt: () => now }
  const times = (
    (await trx('session_mail_log')
      .where({ session_id: sessionId })
      .where('queued_at', '>', since)
      .orderBy('queued_at')
      .select('queued_at')) as { queued_at: string }[]
  ).map((r) => Date.parse(r.queued_at))
  return {
    limit,
    used: times.length,
    free: Math.max(0, limit - times.length),
    fitsAt(n) {
      if (n > limit) return null
      // The oldest mails leave the window first; `over` of them must go before n fit.
      const over = times.length + n - limit
      return over <= 0 ? now : new Date(times[over - 1] + HOUR)
    },
  }
}

/** Refuses `n` more mails that would pass the session's hourly cap; nothing is sent. */
export function assertRoomFor(room: SessionRoom, n: number, now: Date): void {
  if (n <= room.free) return
  const cap = `This session may queue at most ${room.limit} invitation and reminder mails in any hour`
  const at = room.fitsAt(n)
  if (!at)
    throw tooSoon(
      `${cap}, and ${n} is more than one hour allows. Nothing was sent: send them in groups of at most ${room.limit}, an hour apart.`,
    )
  const more = room.free ? `, so ${room.free} more can go now` : ''
  throw tooSoon(
    `${cap}; ${room.used} went in the last hour${more}. Nothing was sent: ${n === 1 ? 'this mail' : `all ${n}`} can go after ${utcTime(at, now)}.`,
  )
}

/** For "remind everyone" with no room left: says when the next of the `due` reminders fit. */
export function assertSomeRoom(room: SessionRoom, due: number, now: Date): void {
  if (!due || room.free) return
  const n = Math.min(due, room.limit)
  throw tooSoon(
    `This session may queue at most ${room.limit} invitation and reminder mails in any hour; ${room.used} went in the last hour. Nothing was sent: the next ${n === 1 ? 'reminder' : `${n} reminders`} can go after ${utcTime(room.fitsAt(n)!, now)}.`,
  )
}

/** Counts one queued mail against the session's hour; no address is kept. */
export async function logSessionMail(
  trx: Knex,
  sessionId: number,
  kind: 'invitation' | 'reminder',
  now: Date,
): Promise<void> {
  await trx('session_mail_log').insert({
    session_id: sessionId,
    kind,
    queued_at: now.toISOString(),
  })
}
