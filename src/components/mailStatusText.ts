// The words for where a mail stands, on the invitations tab and the admin Mail page. A mail is
// "sent" only once the mail server has taken it; until then it is waiting, and staff are told
// what went wrong last and when it is tried next. The server decides; these only say it.
import type { MailItem, MailStatus } from '@shared/schemas/audit'
import type { InvitationMail, InvitationRow, InviteResult } from '@shared/schemas/sessions'
import { when } from './sessionFormat'

type TagType = 'default' | 'info' | 'success' | 'warning' | 'error'

export const WAITING_FOR_SERVER = 'waiting for the mail server'

export const MAIL_STATUS_LABEL: Record<MailStatus, string> = {
  pending: WAITING_FOR_SERVER,
  sending: 'being handed to the mail server',
  sent: 'sent',
  failed: 'not sent',
}

export const MAIL_STATUS_TAG: Record<MailStatus, TagType> = {
  pending: 'warning',
  sending: 'info',
  sent: 'success',
  failed: 'error',
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`

/** "3 players invited; 3 mails queued for the mail server", and who was invited already. */
export function invitedSummary(r: InviteResult): string {
  return (
    `${plural(r.created, 'player')} invited; ${plural(r.mailsQueued, 'mail')} queued for the mail server` +
    (r.existing ? `; ${r.existing} already invited` : '')
  )
}

/** What a waiting mail has been through: tries, the last problem, the next try. */
function waitingDetail(m: {
  attempts: number
  lastError: string | null
  nextTryAt: string | null
}): string {
  const parts: string[] = []
  if (m.attempts && m.lastError)
    parts.push(`Tried ${plural(m.attempts, 'time')}; last problem: ${m.lastError}.`)
  if (m.nextTryAt) parts.push(`Next try after ${when(m.nextTryAt)}.`)
  return parts.join(' ')
}

/** The line under an invitation's status while its latest mail has not gone, else null. */
export function invitationMailLine(
  mail: InvitationMail | null | undefined,
): { label: string; type: TagType; tip: string } | null {
  if (!mail || mail.state === 'sent') return null
  const what = mail.kind === 'reminder' ? 'The reminder' : 'The invitation'
  if (mail.state === 'waiting')
    return {
      label: WAITING_FOR_SERVER,
      type: 'warning',
      tip: [
        `${what} is in the outbox: the mail server has not taken it yet. It is tried again for as long as the session is open.`,
        waitingDetail(mail),
      ]
        .filter(Boolean)
        .join(' '),
    }
  return {
    label: 'mail not sent',
    type: 'error',
    tip: `${what} was not sent: ${mail.lastError ?? 'it will not be tried again'}.`,
  }
}

/** How many of these invitations still wait for the mail server. */
export const waitingMails = (rows: InvitationRow[]) =>
  rows.filter((r) => r.mail?.state === 'waiting').length

/** The "last problem" cell of the admin Mail page. */
export function mailProblem(m: MailItem): string {
  if (!m.lastError) return ''
  if (m.status !== 'pending' || !m.nextAttemptAt) return m.lastError
  return `${m.lastError} (next try ${when(m.nextAttemptAt)})`
}

/** The "tries" cell: a mail of no session says how many it gets. */
export const mailTries = (m: MailItem) =>
  m.maxAttempts === null ? String(m.attempts) : `${m.attempts} of ${m.maxAttempts}`
