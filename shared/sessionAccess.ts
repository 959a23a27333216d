import type { Role } from './constants'

/**
 * The one ownership rule for everything that belongs to a session (README, "Who may do what").
 *
 * - The list of sessions: every staff member sees every session's name, status and maker, so a
 *   team knows what is being run; each row says what the viewer may do with it.
 * - `results`: the session itself and what players gave (detail with its seed, which fixes the
 *   blind codes; findings, exports, exclusions, invitation progress, the player preview). The
 *   developer who made the session, analysts and admins.
 * - `manage`: everything that changes the session or reaches its players (edit, open, close,
 *   time points, invitations, reminders, revocations, label sheets with live player links, the
 *   packing list that unblinds the codes). The developer who made it and admins.
 *
 * Later time points belong to whoever owns the study's first session, so a study's series never
 * mixes owners.
 */
export type SessionAccess = 'results' | 'manage'

export function maySession(
  user: { id: number; role: Role },
  ownerId: number | null,
  access: SessionAccess,
): boolean {
  if (user.role === 'player') return false
  if (user.role === 'admin') return true
  if (user.role === 'analyst') return access === 'results'
  return ownerId !== null && ownerId === user.id
}
