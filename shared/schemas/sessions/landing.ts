import { z } from 'zod'
import type { SessionFormat } from './design'
import type { InvitationStatus } from './invitations'

// What a player's invitation link opens, before any trial.

export const playerLinkQuery = z.object({
  token: z.string().trim().min(1, 'The link has no token').max(4000),
})

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
