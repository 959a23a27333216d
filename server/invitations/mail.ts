import { renderMail } from '../mail/template'
import { LOCAL_RULES_NOTE } from '../../shared/cautions'
import type { SessionFormat } from '../../shared/schemas/sessions'
import { formatOf } from '../formats/index.ts'

export type InvitationMailKind = 'invitation' | 'reminder'

// What the player will do, in their words: the formats' standard names mean little to them.
const WHAT_YOU_DO: Record<SessionFormat, string> = {
  pair: 'You will hear recordings two at a time and say which one you prefer.',
  rating:
    'You will hear recordings one at a time and place each one on a few scales between two words.',
  triangle:
    'You will hear three recordings at a time, two of them alike, and pick the one that differs.',
  playtest:
    'You will receive coded sets of strings, play each set on your own instrument and rate it.',
}

/** Only the session's player title and message: the staff name may name the recipes. */
export interface InvitationMailInput {
  kind: InvitationMailKind
  firstName: string | null
  playerTitle: string
  format: SessionFormat
  playerMessage: string
  deadline: string
  url: string
  answered: number
  trialCount: number
}

export function invitationMail(m: InvitationMailInput) {
  const reminder = m.kind === 'reminder'
  const paragraphs = [
    reminder
      ? m.answered > 0
        ? `A reminder about "${m.playerTitle}": you have answered ${m.answered} of ${m.trialCount} trials so far. The link picks up where you left off.`
        : `A reminder about "${m.playerTitle}": your answers would still be very welcome.`
      : `You are invited to take part in a blind session on Ringdown: "${m.playerTitle}". Nothing in it tells you which string is which, so please judge only what you hear and feel.`,
    WHAT_YOU_DO[m.format],
    ...(m.playerMessage ? [`From the organisers: ${m.playerMessage}`] : []),
    `Please finish by ${m.deadline} (end of that day, UTC). The link below is yours alone and stops working after the deadline.`,
    ...formatOf(m.format).cautions,
  ]
  return renderMail({
    subject: reminder ? `Reminder: ${m.playerTitle}` : `Invitation: ${m.playerTitle}`,
    greeting: m.firstName ? `Hello ${m.firstName},` : 'Hello,',
    paragraphs,
    action: { label: reminder ? 'Continue your session' : 'Open your session', url: m.url },
    footer: `Ringdown. ${LOCAL_RULES_NOTE} If you did not expect this mail, you can ignore it.`,
  })
}

export const firstNameOf = (name: string | null) => name?.trim().split(/\s+/)[0] || null
