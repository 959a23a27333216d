import type { AppContext } from '../context'
import { AppError, invalidToken } from '../errors'
import { deadlineEnd, verifyInvitation } from '../auth/invitationTokens'
import { loadSession, type SessionRow } from '../sessions/rows'
import { answeredCounts, invitationStatus, type InvitationDbRow } from '../invitations/rows'
import { trialCountOf } from '../sessions/plans'
import { formatOf } from '../formats/index.ts'
import { firstNameOf } from '../invitations/mail'
import type { PlayerLanding } from '../../shared/schemas/sessions'

/** A link that was good once and is no longer: 410, with the same stable code as a bad one. */
class GoneLink extends AppError {
  override readonly status: number = 410
  constructor(message: string) {
    super('invalid_token', message)
  }
}

const INVALID = 'This link is not valid. Check that it was copied whole from your invitation.'

/**
 * The invitation behind a player's link, or a clear refusal. The token must be signed by us,
 * be meant for invitations, name this invitation and carry the token id it holds now.
 */
export async function resolvePlayerLink(
  ctx: AppContext,
  token: string,
): Promise<{ inv: InvitationDbRow; session: SessionRow }> {
  const claims = verifyInvitation(ctx.config.jwtSecret, token)
  if (!claims) throw invalidToken(INVALID)
  const inv: InvitationDbRow | undefined = await ctx
    .knex('invitations')
    .where({ id: claims.sub })
    .first()
  if (!inv) throw invalidToken(INVALID)
  if (inv.token_id !== claims.jti) {
    if (inv.revoked_at) throw new GoneLink('This invitation has been withdrawn by the organisers.')
    // A token id that belongs to another invitation is a forged pairing, not an old link.
    if (await ctx.knex('invitations').where({ token_id: claims.jti }).first('id'))
      throw invalidToken(INVALID)
    throw new GoneLink('This link has been replaced by a newer one; please use the latest mail.')
  }
  const session = await loadSession(ctx.knex, inv.session_id)
  if (session.status === 'closed')
    throw new GoneLink('This session has closed. Thank you for your interest.')
  if (session.status !== 'open') throw invalidToken(INVALID)
  // The deadline stored now decides, so a deadline moved later keeps the link working.
  if (ctx.clock.now() >= deadlineEnd(session.deadline))
    throw new GoneLink('This link has expired: the session it was for has passed its deadline.')
  return { inv, session }
}

/** What the player's first page shows; opening it is recorded the first time only. */
export async function playerLanding(ctx: AppContext, token: string): Promise<PlayerLanding> {
  const { inv, session } = await resolvePlayerLink(ctx, token)
  const now = ctx.clock.now()
  if (!inv.opened_at) {
    await ctx
      .knex('invitations')
      .where({ id: inv.id })
      .whereNull('opened_at')
      .update({ opened_at: now.toISOString() })
    inv.opened_at = now.toISOString()
  }
  const player: { name: string | null } = await ctx
    .knex('players')
    .where({ id: inv.player_id })
    .first('name')
  return {
    playerTitle: session.player_title,
    format: session.format,
    playerMessage: session.player_message,
    deadline: session.deadline,
    status: invitationStatus(inv, session, now),
    cautions: [...formatOf(session.format).cautions],
    trialCount: await trialCountOf(ctx.knex, session),
    answered: (await answeredCounts(ctx.knex, [inv.id])).get(inv.id) ?? 0,
    firstName: firstNameOf(player?.name ?? null),
  }
}
