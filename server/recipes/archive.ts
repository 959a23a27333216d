import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { namesOf, opened, sessionsUsing } from '../sessions/usage'
import type { Recipe, RecipeVersionBody } from '../../shared/schemas/recipes'
import { createRecipe, getRecipe } from './service'
import { nextRevision } from '../lib/revision'

// A recipe a session has opened with is frozen: its construction stays what players heard or
// played; a change makes a new version that later sessions can pick. Used recipes are archived,
// never deleted; only an unused one (no session, no clip) is deleted for good.

/** What may still change on a recipe used by an opened session: words, not construction. */
const FREE_FIELDS: readonly string[] = ['name', 'notes', 'status']

export async function assertRecipeChangeAllowed(db: Knex, id: number, changed: string[]) {
  const frozen = changed.filter((f) => !FREE_FIELDS.includes(f))
  if (frozen.length === 0) return
  const using = opened(await sessionsUsing(db, { recipeId: id }))
  if (using.length === 0) return
  throw conflict(
    `This recipe is tested in ${namesOf(using)}, so its construction cannot change. ` +
      'Make a new version for later sessions.',
    Object.fromEntries(frozen.map((f) => [f, ['Frozen: used by a session that has opened']])),
  )
}

/**
 * A new version of a recipe: its construction with the given changes, the same name, the next
 * version number and the recipe as its parent. The original stays as it was.
 */
export async function createRecipeVersion(
  ctx: AppContext,
  id: number,
  changes: RecipeVersionBody,
  actor: Actor,
): Promise<Recipe> {
  const base = await getRecipe(ctx.knex, id)
  const {
    id: _id,
    parentName: _p,
    createdBy: _c,
    createdAt: _a,
    updatedAt: _u,
    archivedAt: _x,
    revision: _r,
    ...fields
  } = base
  const created = await createRecipe(ctx, { ...fields, ...changes }, actor, id)
  return created
}

async function setArchived(ctx: AppContext, id: number, archive: boolean, actor: Actor) {
  await ctx.knex.transaction(async (trx) => {
    const row: { archived_at: string | null } | undefined = await trx('recipes')
      .where({ id })
      .first('archived_at')
    if (!row) throw notFound('Recipe')
    if (archive && row.archived_at) throw conflict('This recipe is already archived')
    if (!archive && !row.archived_at) throw conflict('This recipe is not archived')
    const now = ctx.clock.now()
    await trx('recipes')
      .where({ id })
      .update({
        archived_at: archive ? now.toISOString() : null,
        updated_at: now.toISOString(),
        ...nextRevision(trx),
      })
    await recordAudit(trx, now, actor, {
      action: archive ? 'recipe.archived' : 'recipe.restored',
      targetType: 'recipe',
      targetId: id,
    })
  })
  return getRecipe(ctx.knex, id)
}

export const archiveRecipe = (ctx: AppContext, id: number, actor: Actor) =>
  setArchived(ctx, id, true, actor)
export const restoreRecipe = (ctx: AppContext, id: number, actor: Actor) =>
  setArchived(ctx, id, false, actor)

/** Deletes a recipe nothing refers to; anything used is archived instead. */
export async function deleteRecipe(ctx: AppContext, id: number, actor: Actor) {
  await getRecipe(ctx.knex, id)
  const using = await sessionsUsing(ctx.knex, { recipeId: id })
  if (using.length)
    throw conflict(`This recipe is used by ${namesOf(using)}: archive it instead of deleting it.`)
  const [{ n }] = (await ctx.knex('clips').where({ recipe_id: id }).count({ n: '*' })) as {
    n: number
  }[]
  if (Number(n) > 0)
    throw conflict(
      `This recipe has ${n} recording${Number(n) === 1 ? '' : 's'}: delete or archive them first.`,
    )
  await ctx.knex.transaction(async (trx) => {
    // Its children lose their parent: a form opened on one of them is out of date now.
    await trx('recipes')
      .where({ parent_id: id })
      .update({ parent_id: null, ...nextRevision(trx) })
    await trx('recipes').where({ id }).delete()
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'recipe.deleted',
      targetType: 'recipe',
      targetId: id,
    })
  })
  return { id }
}
