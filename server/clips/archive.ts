import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { namesOf, opened, sessionsUsing } from '../sessions/usage'
import type { ClipDetail } from '../../shared/schemas/clips'
import { getClip } from './read'
import { nextRevision } from '../lib/revision'

// A clip that a session uses is evidence: it is archived (kept, hidden from pickers and lists)
// instead of deleted, and once a session has opened, only its notes can change.

/** Fields of a clip that may change while sessions that have opened play it. */
const FREE_FIELDS: readonly string[] = ['notes']

/** Refuses a change to what a clip is when opened sessions have served it or will. */
export async function assertClipChangeAllowed(db: Knex, id: number, changed: string[]) {
  const frozen = changed.filter((f) => !FREE_FIELDS.includes(f))
  if (frozen.length === 0) return
  const using = opened(await sessionsUsing(db, { clipId: id }))
  if (using.length === 0) return
  throw conflict(
    `This clip is played in ${namesOf(using)}, so only its notes can change. ` +
      'Upload the recording again as a new clip for later sessions.',
    Object.fromEntries(frozen.map((f) => [f, ['Frozen: used by a session that has opened']])),
  )
}

/** Refuses to delete a clip any session names; such a clip is archived instead. */
export async function assertClipDeletable(db: Knex, id: number) {
  const using = await sessionsUsing(db, { clipId: id })
  if (using.length)
    throw conflict(`This clip is used by ${namesOf(using)}: archive it instead of deleting it.`)
}

async function setArchived(
  ctx: AppContext,
  id: number,
  archive: boolean,
  actor: Actor,
): Promise<ClipDetail> {
  await ctx.knex.transaction(async (trx) => {
    const row: { archived_at: string | null } | undefined = await trx('clips')
      .where({ id })
      .first('archived_at')
    if (!row) throw notFound('Clip')
    if (archive && row.archived_at) throw conflict('This clip is already archived')
    if (!archive && !row.archived_at) throw conflict('This clip is not archived')
    const now = ctx.clock.now()
    await trx('clips')
      .where({ id })
      .update({
        archived_at: archive ? now.toISOString() : null,
        updated_at: now.toISOString(),
        ...nextRevision(trx),
      })
    await recordAudit(trx, now, actor, {
      action: archive ? 'clips.archived' : 'clips.restored',
      targetType: 'clip',
      targetId: id,
    })
  })
  return getClip(ctx.knex, id)
}

/** Hides a clip from lists and pickers; sessions that use it keep it, findings and all. */
export const archiveClip = (ctx: AppContext, id: number, actor: Actor) =>
  setArchived(ctx, id, true, actor)

/** Offers an archived clip again. */
export const restoreClip = (ctx: AppContext, id: number, actor: Actor) =>
  setArchived(ctx, id, false, actor)
