import type { AppContext } from '../context'
import {
  assertConsent,
  assertStillOpen,
  openForAnswers,
  openForReading,
  type PlayerAccess,
} from './access'
import { plannedTrials } from './plan'
import { readAnswer } from '../answers/stored'
import { invitationStatus } from '../invitations/rows'
import { formatOf } from '../formats/index.ts'
import { firstNameOf } from '../invitations/mail'
import type { PlayerState } from '../../shared/schemas/rating'
import { checkRows, playerHeadphoneOf, recordOf } from './headphoneRecord'
import { assertHeadphoneFinished } from './headphoneGate'

/** Where the player stands, as every step before the trials answers it. */
export async function stateOf(
  ctx: AppContext,
  { inv, session, canAnswer }: PlayerAccess,
): Promise<PlayerState> {
  const trials = await plannedTrials(ctx.knex, session, inv)
  const rows: { id: number; trial_index: number; payload: string }[] = await ctx
    .knex('answers')
    .where({ invitation_id: inv.id })
    .orderBy('trial_index')
    .select('id', 'trial_index', 'payload')
  const answers = rows.map((r) => ({
    trialIndex: r.trial_index,
    answer: readAnswer(r, trials[r.trial_index]),
  }))
  const player: { name: string | null } | undefined = await ctx
    .knex('players')
    .where({ id: inv.player_id })
    .first('name')
  const headphone = playerHeadphoneOf(recordOf(await checkRows(ctx.knex, inv.id)), ctx.clock.now())
  return {
    landing: {
      playerTitle: session.player_title,
      format: session.format,
      playerMessage: session.player_message,
      deadline: session.deadline,
      status: invitationStatus(inv, session, ctx.clock.now()),
      cautions: [...formatOf(session.format).cautions],
      trialCount: trials.length,
      answered: rows.length,
      firstName: firstNameOf(player?.name ?? null),
    },
    consentAt: inv.consent_at,
    headphone,
    levelSetAt: inv.level_set_at,
    answers,
    canAnswer,
  }
}

/** Where the player stands; the first visit of a link that still works counts as opening it. */
export async function playerState(ctx: AppContext, token: string): Promise<PlayerState> {
  const access = await openForReading(ctx, token)
  if (access.canAnswer && !access.inv.opened_at) {
    const now = ctx.clock.now().toISOString()
    await ctx
      .knex('invitations')
      .where({ id: access.inv.id })
      .whereNull('opened_at')
      .update({ opened_at: now })
    access.inv.opened_at = now
  }
  return stateOf(ctx, access)
}

/**
 * One step of the way in, written only while the link may still change something; `first`
 * checks what the step needs before it (it may read, and refuse).
 */
async function step(
  ctx: AppContext,
  token: string,
  change: (access: PlayerAccess, now: string) => Record<string, unknown>,
  first?: (access: PlayerAccess) => Promise<void>,
): Promise<PlayerState> {
  const access = await openForAnswers(ctx, token)
  await first?.(access)
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    await assertStillOpen(trx, access, now)
    await trx('invitations').where({ id: access.inv.id }).update(change(access, now.toISOString()))
  })
  return stateOf(ctx, {
    ...access,
    inv: await ctx.knex('invitations').where({ id: access.inv.id }).first(),
  })
}

/** The first consent stands: giving it again does not move its time. */
export const giveConsent = (ctx: AppContext, token: string) =>
  step(ctx, token, ({ inv }, now) => ({
    consent_at: inv.consent_at ?? now,
    opened_at: inv.opened_at ?? now,
  }))

/**
 * In a listening session the level follows the finished headphone check, as on the player's
 * page; a play-test has no check and no wait.
 */
export const confirmLevel = (ctx: AppContext, token: string) =>
  step(
    ctx,
    token,
    (_access, now) => ({ level_set_at: now }),
    async ({ inv, session }) => {
      assertConsent(inv)
      await assertHeadphoneFinished(ctx.knex, session, inv.id)
    },
  )
