import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { AppError, conflict } from '../errors'
import { deadlineEnd, verifyInvitation } from '../auth/invitationTokens'
import { resolvePlayerLink } from './landing'
import { loadSession, type SessionRow } from '../sessions/rows'
import { syncRead } from '../db/syncTransaction'
import type { InvitationDbRow } from '../invitations/rows'
import { readStanding, type HeadphoneStanding } from './headphoneGate'
import { hasHeadphoneCheck } from './headphoneRecord'

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
 * The answer path's version of openForAnswers: one synchronous read when all is well (the
 * common case, hundreds of times a second at peak); anything unusual falls back to the full
 * check, which says exactly what is wrong with the link. The same read also fetches the
 * headphone check's standing for sessions that have one, so a save needs no second read;
 * `headphone` is undefined when it was not read (no check in this format, or the fallback).
 */
export async function openForAnswersQuickly(
  ctx: AppContext,
  token: string,
): Promise<PlayerAccess & { headphone?: HeadphoneStanding }> {
  const claims = verifyInvitation(ctx.config.jwtSecret, token)
  if (claims) {
    const found = await syncRead(ctx.knex, (db) => {
      const inv = db.get<PlayerInvitationRow>('select * from invitations where id = ?', claims.sub)
      const session =
        inv && db.get<SessionRow>('select * from sessions where id = ?', inv.session_id)
      if (!inv || !session) return null
      const headphone = hasHeadphoneCheck(session.format)
        ? (readStanding(db, inv.id) ?? { passed: null, attempts: null })
        : undefined
      return { inv, session, headphone }
    })
    if (
      found &&
      !found.inv.revoked_at &&
      found.inv.token_id === claims.jti &&
      found.session.status === 'open' &&
      ctx.clock.now() < deadlineEnd(found.session.deadline)
    )
      return { ...found, canAnswer: true }
  }
  return openForAnswers(ctx, token)
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
  const row: StillOpenRow | undefined = await trx('invitations as i')
    .join('sessions as s', 's.id', 'i.session_id')
    .where('i.id', access.inv.id)
    .first('i.*', 's.status as s_status', 's.deadline as s_deadline')
  checkStillOpen(row, access, now)
}

/** The invitation row with its session's status and deadline, read in one join. */
export type StillOpenRow = PlayerInvitationRow & { s_status: string; s_deadline: string }

export const STILL_OPEN_SQL =
  'select i.*, s.status as s_status, s.deadline as s_deadline from invitations i ' +
  'join sessions s on s.id = i.session_id where i.id = ?'

/** The re-check on a freshly read row; refreshes `access.inv` when the link still works. */
export function checkStillOpen(row: StillOpenRow | undefined, access: PlayerAccess, now: Date) {
  if (!row || row.revoked_at || row.token_id !== access.inv.token_id)
    throw new GoneForAnswers('This invitation has been withdrawn by the organisers.')
  if (row.s_status !== 'open')
    throw new GoneForAnswers('This session has closed; answers can no longer change.')
  if (now >= deadlineEnd(row.s_deadline))
    throw new GoneForAnswers('The deadline has passed; answers can no longer change.')
  const { s_status: _status, s_deadline: _deadline, ...inv } = row
  access.inv = inv
}

export function assertConsent(inv: PlayerInvitationRow): void {
  if (!inv.consent_at) throw conflict('Please give your consent first')
}
