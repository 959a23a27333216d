/*
 * Changing and deleting clips. Both run in the set queue: moving a clip to another set, or
 * taking it away, re-balances the sets it leaves and joins.
 */
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { originalPath, removeMedia, renditionPath } from './storage'
import { measureColumns, measureFile } from './measure'
import { memberOfRow, setKeyId } from './setMembers'
import { resolveClipFields, type ResolvedFields } from './fields'
import { fieldColumns, fieldsOfRow, type StoredRow } from './columns'
import { clipDeps, keyOf, serialised, withBalancedSets } from './balance'
import { getClip } from './read'
import { assertClipChangeAllowed, assertClipDeletable } from './archive'
import { assertRevision, updateAtRevision } from '../lib/revision'
import type { ClipDetail, ClipUploadFields } from '../../shared/schemas/clips'

/**
 * Changes a clip's fields, as long as nobody has changed the clip since the form was loaded at
 * `revision`. Moving it to another set re-balances both sets; changing its kind measures the
 * original again, since decay and attack belong to different kinds.
 */
export function updateClip(
  ctx: AppContext,
  id: number,
  { revision, ...body }: Partial<ClipUploadFields> & { revision: number },
  actor: Actor,
): Promise<ClipDetail> {
  const deps = clipDeps(ctx)
  return serialised(ctx.knex, async () => {
    const row: (StoredRow & { revision: number }) | undefined = await ctx
      .knex('clips')
      .where({ id })
      .first()
    if (!row) throw notFound('Clip')
    assertRevision('clips', row, revision)
    const before = fieldsOfRow(row)
    const after = await resolveClipFields(
      ctx.knex,
      { ...before, ...body },
      { allowRetiredExcerptId: row.excerpt_id },
    )
    const changed = (Object.keys(after) as (keyof ResolvedFields)[]).filter(
      (k) => after[k] !== before[k],
    )
    if (changed.length === 0) return getClip(ctx.knex, id)
    // Only what the editor asked to change counts: blank fields are filled in from the recipe.
    await assertClipChangeAllowed(
      ctx.knex,
      id,
      changed.filter((k) => k in body),
    )

    const remeasured =
      after.kind !== before.kind
        ? measureColumns(
            await measureFile(originalPath(deps.folders, row.original_file), after.kind, ctx.pool),
          )
        : {}
    const write = async (trx: Knex.Transaction) => {
      // The rendition writes of a set move leave the revision alone: they change no field.
      await updateAtRevision(trx, 'clips', id, revision, {
        ...fieldColumns(after),
        ...remeasured,
        updated_at: deps.clock.now().toISOString(),
      })
      await recordAudit(trx, deps.clock.now(), actor, {
        action: 'clips.updated',
        targetType: 'clip',
        targetId: id,
        details: { fields: changed },
      })
    }
    const oldKey = keyOf(before)
    const newKey = keyOf(after)
    if (setKeyId(oldKey) === setKeyId(newKey)) await ctx.knex.transaction(write)
    else {
      const moving = memberOfRow(newKey, row)
      await withBalancedSets(deps, [oldKey, newKey], { extra: [moving], excludeIds: [id] }, write)
    }
    return getClip(ctx.knex, id)
  })
}

/**
 * Deletes a clip no session uses, with both its files; the rest of its set is re-balanced.
 * A clip a session uses is archived instead (see archive.ts).
 */
export function deleteClip(ctx: AppContext, id: number, actor: Actor): Promise<{ id: number }> {
  const deps = clipDeps(ctx)
  return serialised(ctx.knex, async () => {
    const row: StoredRow | undefined = await ctx.knex('clips').where({ id }).first()
    if (!row) throw notFound('Clip')
    await assertClipDeletable(ctx.knex, id)
    await withBalancedSets(deps, [keyOf(fieldsOfRow(row))], { excludeIds: [id] }, async (trx) => {
      await trx('clips').where({ id }).delete()
      await recordAudit(trx, deps.clock.now(), actor, {
        action: 'clips.deleted',
        targetType: 'clip',
        targetId: id,
        details: { recipeId: row.recipe_id, excerptId: row.excerpt_id },
      })
    })
    await removeMedia([
      originalPath(deps.folders, row.original_file),
      renditionPath(deps.folders, row.rendition_file),
    ])
    return { id }
  })
}
