import { z } from 'zod'
import { SESSION_LIMITS } from './design'

// Inviting players, following their progress, and the play-test label sheet.

export const INVITATION_STATUSES = [
  'invited',
  'opened',
  'in_progress',
  'done',
  'expired',
  'revoked',
] as const
export type InvitationStatus = (typeof INVITATION_STATUSES)[number]

export const inviteBody = z.strictObject({
  playerIds: z
    .array(z.number().int().positive())
    .min(1, 'Choose at least one player')
    .max(SESSION_LIMITS.invitePlayersMax, `At most ${SESSION_LIMITS.invitePlayersMax} at once`),
})
export type InviteBody = z.infer<typeof inviteBody>

export interface InvitationRow {
  id: number
  sessionId: number
  playerId: number
  playerCode: string
  playerName: string | null
  playerEmail: string | null
  status: InvitationStatus
  invitedAt: string
  /**
   * When the invitation mail was last queued (first or again). Whether the mail server has
   * taken it yet is in `mail`.
   */
  lastSentAt: string
  openedAt: string | null
  startedAt: string | null
  completedAt: string | null
  revokedAt: string | null
  lastRemindedAt: string | null
  remindersSent: number
  /**
   * When the next reminder may go: the reminder gap after the player's last mail. Null when one
   * may go now (whether the status allows one is the status's business).
   */
  nextReminderAt: string | null
  /** Likewise for sending the invitation again, which waits a shorter gap. */
  nextResendAt: string | null
  answered: number
  trialCount: number
  /**
   * Staff only: where the player's headphone check stands ('retry': failed once, may try
   * again; 'failed': failed after the retry, the player went on flagged). Null for a play-test,
   * which has no check. Filled by the tracking list and the follow-up actions.
   */
  headphoneCheck?: HeadphoneCheckState | null
  /**
   * Where the latest mail queued for this invitation stands (the invitation, a resend or a
   * reminder); null when none was queued through the outbox. Filled by the tracking list and
   * the follow-up actions.
   */
  mail?: InvitationMail | null
}

/**
 * 'waiting': in the outbox, not yet taken by the mail server (it is tried again while the
 * session is open); 'sent': the mail server took it; 'failed': it will not go (the session
 * closed or its deadline passed first), with the reason in lastError.
 */
export const INVITATION_MAIL_STATES = ['waiting', 'sent', 'failed'] as const
export type InvitationMailState = (typeof INVITATION_MAIL_STATES)[number]

export interface InvitationMail {
  kind: 'invitation' | 'reminder'
  state: InvitationMailState
  queuedAt: string
  sentAt: string | null
  /** Tries so far. */
  attempts: number
  /** What went wrong on the last try, or why it will not go. */
  lastError: string | null
  /** When the next try is due, while it waits. */
  nextTryAt: string | null
}

export type HeadphoneCheckState = 'passed' | 'retry' | 'failed' | 'not_done'

export interface InviteResult {
  created: number
  existing: number
  /** Invitation mails this call put in the outbox; they go out as the mail server takes them. */
  mailsQueued: number
}

/** What "remind everyone not done" did. */
export interface RemindAllResult {
  reminded: number
  /** Players left out because their last mail went within the reminder gap. */
  skippedRecent: number
  /** Players left out because the session's hourly mail cap was reached; a later call sends. */
  heldBack: number
  /** The reminder gap, in hours, for the words beside the counts. */
  reminderGapHours: number
  /** When the next of those held back fit (all, or an hour's worth); null when none were. */
  moreAfter: string | null
}

export interface LabelSet {
  code: number
  /** Order in which the player fits and plays the sets, from 1. */
  position: number
  qrSvg: string
  url: string
}

/** Staff only: which recipe goes into which coded envelope. */
export interface PackingLine {
  code: number
  position: number
  recipeName: string
}

/**
 * The labels that travel with the strings, one sheet per player: codes, QR codes, the player
 * title and the fitting caution. No recipe and no staff name: players and anyone near the
 * envelopes may read them.
 */
export interface LabelSheet {
  playerTitle: string
  players: {
    playerCode: string
    sets: LabelSet[]
  }[]
  caution: string
}

/** Staff only, printed apart from the labels: the key to every player's coded envelopes. */
export interface PackingList {
  sessionName: string
  players: {
    playerCode: string
    playerName: string | null
    lines: PackingLine[]
  }[]
}
