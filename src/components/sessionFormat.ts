import type { InvitationStatus, SessionFormat, SessionStatus } from '@shared/schemas/sessions'

export const FORMAT_SHORT: Record<SessionFormat, string> = {
  pair: 'Pair preference',
  rating: 'Attribute rating',
  triangle: 'Odd-one-out',
  playtest: 'Play-test',
}

export const STATUS_TAG: Record<SessionStatus, 'default' | 'success' | 'warning'> = {
  draft: 'default',
  open: 'success',
  closed: 'warning',
}

export const INVITATION_LABEL: Record<InvitationStatus, string> = {
  invited: 'invited',
  opened: 'opened',
  in_progress: 'in progress',
  done: 'done',
  expired: 'expired',
  revoked: 'revoked',
}

export const INVITATION_TAG: Record<
  InvitationStatus,
  'default' | 'info' | 'success' | 'warning' | 'error'
> = {
  invited: 'default',
  opened: 'info',
  in_progress: 'warning',
  done: 'success',
  expired: 'error',
  revoked: 'error',
}

export const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : '—')
