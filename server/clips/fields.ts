import type { Knex } from 'knex'
import { validationFailed } from '../errors'
import { TUNINGS, type Instrument } from '../../shared/constants'
import type { ClipUploadFields } from '../../shared/schemas/clips'

/** Clip fields after the database has confirmed recipe, excerpt and string. */
export type ResolvedFields = ClipUploadFields

interface RecipeRef {
  id: number
  instrument: Instrument
  string_name: string
}

/**
 * Checks what the shape alone cannot: the recipe and excerpt exist (the excerpt still offered)
 * and the string played is one the recipe's instrument has; an empty string played means the
 * recipe's own string. Returns the problems per field instead of throwing, for manifests.
 */
export async function checkClipFields(
  db: Knex,
  body: ClipUploadFields,
  options: { allowRetiredExcerptId?: number } = {},
): Promise<{ fields: ResolvedFields | null; problems: Record<string, string[]> }> {
  const problems: Record<string, string[]> = {}
  const recipe: RecipeRef | undefined = await db('recipes')
    .where({ id: body.recipeId })
    .first('id', 'instrument', 'string_name')
  if (!recipe) problems.recipeId = ['No such recipe']
  const excerpt: { id: number; active: number | boolean } | undefined = await db('excerpts')
    .where({ id: body.excerptId })
    .first('id', 'active')
  if (!excerpt) problems.excerptId = ['No such excerpt']
  else if (!excerpt.active && excerpt.id !== options.allowRetiredExcerptId)
    problems.excerptId = ['This excerpt is retired; choose another or make it active again']

  let stringPlayed = body.stringPlayed
  if (recipe) {
    const names = TUNINGS[recipe.instrument]?.map((s) => s.name) ?? []
    if (!stringPlayed) stringPlayed = recipe.string_name
    const match = names.find((n) => n.toLowerCase() === stringPlayed.toLowerCase())
    if (match) stringPlayed = match
    else problems.stringPlayed = [`A ${recipe.instrument} has the strings ${names.join(', ')}`]
  }
  if (Object.keys(problems).length) return { fields: null, problems }
  return { fields: { ...body, stringPlayed }, problems }
}

export async function resolveClipFields(
  db: Knex,
  body: ClipUploadFields,
  options?: { allowRetiredExcerptId?: number },
): Promise<ResolvedFields> {
  const { fields, problems } = await checkClipFields(db, body, options)
  if (!fields) throw validationFailed('Some fields need attention', { fields: problems })
  return fields
}
