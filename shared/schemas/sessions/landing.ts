import { z } from 'zod'
import type { SessionFormat } from './design'
import type { InvitationStatus } from './invitations'

// What a player's invitation link opens, before any trial.

/** The invitation token from INVITATION_HEADER (Node gives header names in lower case). */
export const playerLinkHeaders = z
  .object({
    'x-invitation-token': z.string().trim().min(1, 'The link has no token').max(4000),
  })
  .transform((h) => ({ token: h['x-invitation-token'] }))

/** What an invitation link opens, before the first trial. */
export interface PlayerLanding {
  /** The session's player title and message: never its staff name or purpose. */
  playerTitle: string
  format: SessionFormat
  playerMessage: string
  deadline: string
  status: InvitationStatus
  cautions: string[]
  trialCount: number
  answered: number
  firstName: string | null
}
