import type { AppContext } from '../context'
import { conflict } from '../errors'
import type { Actor } from '../audit/service'
import { getSession } from './read'
import { createSession } from './design'
import { openSession } from './lifecycle'
import { designOf, loadSession } from './rows'
import { invitePlayers } from '../invitations/invite'
import type { SessionDetail, TimePointBody } from '../../shared/schemas/sessions'

/**
 * A later time point of an aging study: the same design (recipes, clips, attributes, repeats)
 * under a seed of its own, linked to the first session. With `inviteSamePlayers` it opens at
 * once and invites everyone still active who was invited (and not revoked) at the source.
 */
export async function addTimePoint(
  ctx: AppContext,
  sourceId: number,
  body: Required<TimePointBody>,
  actor: Actor,
): Promise<SessionDetail> {
  const source = await loadSession(ctx.knex, sourceId)
  const root = source.parent_session_id
    ? await loadSession(ctx.knex, source.parent_session_id)
    : source
  const labels: { time_point_label: string | null }[] = await ctx
    .knex('sessions')
    .where({ id: root.id })
    .orWhere({ parent_session_id: root.id })
    .select('time_point_label')
  if (labels.some((l) => l.time_point_label?.toLowerCase() === body.label.toLowerCase()))
    throw conflict('This study already has a time point with that label', {
      label: ['Already used in this study'],
    })
  const design = designOf(source)
  const created = await createSession(
    ctx,
    {
      name: root.name,
      purpose: source.purpose,
      format: design.format,
      recipeIds: design.recipeIds,
      clipSets: design.clipSets,
      attributes: design.attributes,
      duplicates: design.duplicates,
      allowNoPreference: Boolean(source.allow_no_preference),
      adjustment: source.adjustment ?? 'holm',
      targetDifference: source.target_difference ?? null,
      playerTitle: source.player_title,
      playerMessage: source.player_message,
      deadline: body.deadline,
      reminderDaysBefore: source.reminder_days_before,
      timePointLabel: body.label,
    },
    actor,
    { parentSessionId: root.id, ownerId: root.created_by },
  )
  if (!body.inviteSamePlayers) return created
  // A later time point plays what the first did: the single-take choice made then carries over.
  await openSession(ctx, created.id, actor, {
    acceptSameTake: Boolean(source.same_take_accepted_at),
  })
  const players = (
    (await ctx
      .knex('invitations as i')
      .join('players as p', 'p.id', 'i.player_id')
      .where('i.session_id', source.id)
      .whereNull('i.revoked_at')
      .where('p.status', 'active')
      .whereNotNull('p.email')
      .orderBy('i.player_index')
      .select('p.id')) as { id: number }[]
  ).map((r) => r.id)
  if (players.length) await invitePlayers(ctx, created.id, players, actor)
  return getSession(ctx.knex, created.id, ctx.clock.now())
}
