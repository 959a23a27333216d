import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { AppError, conflict } from '../errors'
import { deadlineEnd, verifyInvitation } from '../auth/invitationTokens'
import { resolvePlayerLink } from './playerLink'
import { loadSession, type SessionRow } from './sessionRows'
import type { InvitationDbRow } from './invitationRows'

/** The invitation row with the player's steps before the trials. */
export interface PlayerInvitationRow extends InvitationDbRow {
  consent_at: string | null
  headphone_correct: number | null
  headphone_trials: number | null
  headphone_attempts: number
  level_set_at: string | null
}

export interface PlayerAccess {
  inv: PlayerInvitationRow
  session: SessionRow
  /** False when the link still names this invitation but the session no longer takes answers. */
  canAnswer: boolean
}

/** The same stable code and status the landing uses for a link that was good once. */
export class GoneForAnswers extends AppError {
  override readonly status: number = 410
  constructor(message: string) {
    super('invalid_token', message)
  }
}

/**
 * A link that may change something: the same checks as the landing (signature, current token
 * id, open session, deadline).
 */
export async function openForAnswers(ctx: AppContext, token: string): Promise<PlayerAccess> {
  const { inv, session } = await resolvePlayerLink(ctx, token)
  return { inv: inv as PlayerInvitationRow, session, canAnswer: true }
}

/**
 * A link that only reads: after the session closes or its deadline passes the player may still
 * see what they gave, but a revoked or replaced link shows nothing.
 */
export async function openForReading(ctx: AppContext, token: string): Promise<PlayerAccess> {
  try {
    return await openForAnswers(ctx, token)
  } catch (err) {
    if (!(err instanceof AppError) || err.status !== 410) throw err
    const claims = verifyInvitation(ctx.config.jwtSecret, token)
    const inv: PlayerInvitationRow | undefined = claims
      ? await ctx.knex('invitations').where({ id: claims.sub }).first()
      : undefined
    if (!claims || !inv || inv.revoked_at || inv.token_id !== claims.jti) throw err
    return { inv, session: await loadSession(ctx.knex, inv.session_id), canAnswer: false }
  }
}

/**
 * Checked again inside the writing transaction, so a revocation or a close that lands between
 * the first check and the write still stops it.
 */
export async function assertStillOpen(trx: Knex, access: PlayerAccess, now: Date): Promise<void> {
  const inv: PlayerInvitationRow | undefined = await trx('invitations')
    .where({ id: access.inv.id })
    .first()
  const session: SessionRow | undefined = await trx('sessions')
    .where({ id: access.session.id })
    .first()
  if (!inv || inv.revoked_at || inv.token_id !== access.inv.token_id)
    throw new GoneForAnswers('This invitation has been withdrawn by the organisers.')
  if (!session || session.status !== 'open')
    throw new GoneForAnswers('This session has closed; answers can no longer change.')
  if (now >= deadlineEnd(session.deadline))
    throw new GoneForAnswers('The deadline has passed; answers can no longer change.')
  access.inv = inv
}

export function assertConsent(inv: PlayerInvitationRow): void {
  if (!inv.consent_at) throw conflict('Please give your consent first')
}
