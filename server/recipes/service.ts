import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, notFound, validationFailed } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { whereContains } from '../db/like'
import { TUNINGS } from '../../shared/constants'
import { assertRecipeChangeAllowed } from './archive'
import { assertRevision, updateAtRevision } from '../lib/revision'
import type {
  CreateRecipeBody,
  ListRecipesQuery,
  Recipe,
  UpdateRecipeBody,
  WindingLayer,
} from '../../shared/schemas/recipes'

interface RecipeRow {
  id: number
  name: string
  instrument: Recipe['instrument']
  string_name: string
  core: Recipe['core']
  windings: string
  damping_kind: Recipe['dampingKind']
  damping_grade: string
  damping_notes: string
  gauge_mm: number | null
  tension_n: number | null
  vibrating_length_mm: number
  version: number
  parent_id: number | null
  parent_name: string | null
  status: Recipe['status']
  notes: string
  revision: number
  archived_at: string | null
  created_by_email: string | null
  created_at: string
  updated_at: string
}

const toRecipe = (r: RecipeRow): Recipe => ({
  id: r.id,
  name: r.name,
  instrument: r.instrument,
  stringName: r.string_name,
  core: r.core,
  windings: JSON.parse(r.windings) as WindingLayer[],
  dampingKind: r.damping_kind,
  dampingGrade: r.damping_grade,
  dampingNotes: r.damping_notes,
  gaugeMm: r.gauge_mm,
  tensionN: r.tension_n,
  vibratingLengthMm: r.vibrating_length_mm,
  version: r.version,
  parentId: r.parent_id,
  parentName: r.parent_name,
  status: r.status,
  notes: r.notes,
  revision: r.revision,
  archivedAt: r.archived_at,
  createdBy: r.created_by_email,
  createdAt: r.created_at,
  updatedAt: r.updated_at,
})

function baseQuery(knex: Knex) {
  return knex('recipes as r')
    .leftJoin('recipes as p', 'p.id', 'r.parent_id')
    .leftJoin('users as u', 'u.id', 'r.created_by')
    .select('r.*', 'p.name as parent_name', 'u.email as created_by_email')
}

export async function listRecipes(knex: Knex, query: ListRecipesQuery): Promise<Recipe[]> {
  const q = baseQuery(knex)
  if (query.status !== 'all') q.where('r.status', query.status)
  if (query.archived === 'hide') q.whereNull('r.archived_at')
  if (query.archived === 'only') q.whereNotNull('r.archived_at')
  if (query.instrument) q.where('r.instrument', query.instrument)
  if (query.stringName) q.where('r.string_name', query.stringName)
  if (query.core) q.where('r.core', query.core)
  if (query.dampingKind) q.where('r.damping_kind', query.dampingKind)
  if (query.q) {
    const text = query.q
    q.where((w) => {
      for (const [i, column] of [
        'r.name',
        'r.notes',
        'r.damping_grade',
        'r.damping_notes',
      ].entries())
        whereContains(w, column, text, i > 0)
    })
  }
  const rows: RecipeRow[] = await q.orderBy('r.name').orderBy('r.version')
  return rows.map(toRecipe)
}

export async function getRecipe(knex: Knex, id: number): Promise<Recipe> {
  const row: RecipeRow | undefined = await baseQuery(knex).where('r.id', id).first()
  if (!row) throw notFound('Recipe')
  return toRecipe(row)
}

/** A parent must exist and must not be the recipe itself or one of its descendants. */
async function checkParent(db: Knex, id: number | null, parentId: number | null) {
  if (parentId === null) return
  if (!(await db('recipes').where({ id: parentId }).first()))
    throw validationFailed('Some fields need attention', {
      fields: { parentId: ['No such recipe'] },
    })
  let cursor: number | null = parentId
  for (let depth = 0; cursor !== null && depth < 1000; depth++) {
    if (cursor === id)
      throw validationFailed('Some fields need attention', {
        fields: { parentId: ['A recipe cannot descend from itself'] },
      })
    const row: { parent_id: number | null } | undefined = await db('recipes')
      .where({ id: cursor })
      .select('parent_id')
      .first()
    cursor = row?.parent_id ?? null
  }
}

async function checkUnique(db: Knex, name: string, version: number, exceptId?: number) {
  const q = db('recipes').where({ name, version })
  if (exceptId) q.whereNot({ id: exceptId })
  if (await q.first())
    throw conflict(`There is already a recipe "${name}" version ${version}`, {
      name: ['Name and version are already in use'],
    })
}

type NewRecipe = Required<Omit<CreateRecipeBody, 'windings'>> & { windings: WindingLayer[] }

function columns(body: Partial<NewRecipe>): Record<string, unknown> {
  const map: Record<string, unknown> = {
    name: body.name,
    instrument: body.instrument,
    string_name: body.stringName,
    core: body.core,
    windings: body.windings === undefined ? undefined : JSON.stringify(body.windings),
    damping_kind: body.dampingKind,
    damping_grade: body.dampingGrade,
    damping_notes: body.dampingNotes,
    gauge_mm: body.gaugeMm,
    tension_n: body.tensionN,
    vibrating_length_mm: body.vibratingLengthMm,
    version: body.version,
    parent_id: body.parentId,
    status: body.status,
    notes: body.notes,
  }
  return Object.fromEntries(Object.entries(map).filter(([, v]) => v !== undefined))
}

export async function createRecipe(
  ctx: AppContext,
  given: NewRecipe,
  actor: Actor,
  /** Makes the recipe the next version of this one: numbered inside the same transaction. */
  versionOf?: number,
): Promise<Recipe> {
  const id = await ctx.knex.transaction(async (trx) => {
    let body = given
    if (versionOf !== undefined) {
      const [{ max }] = (await trx('recipes')
        .where({ name: given.name })
        .max({ max: 'version' })) as {
        max: number | null
      }[]
      body = { ...given, version: (max ?? 0) + 1, parentId: versionOf }
    }
    await checkUnique(trx, body.name, body.version)
    await checkParent(trx, null, body.parentId)
    const now = ctx.clock.now().toISOString()
    const [id] = await trx('recipes').insert({
      ...columns(body),
      created_by: actor.userId,
      created_at: now,
      updated_at: now,
    })
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'recipe.created',
      targetType: 'recipe',
      targetId: id as number,
      details: { name: body.name, version: body.version },
    })
    if (versionOf !== undefined)
      await recordAudit(trx, ctx.clock.now(), actor, {
        action: 'recipe.versioned',
        targetType: 'recipe',
        targetId: id as number,
        details: { from: versionOf, version: body.version },
      })
    return id as number
  })
  return getRecipe(ctx.knex, id)
}

export async function updateRecipe(
  ctx: AppContext,
  id: number,
  body: UpdateRecipeBody,
  actor: Actor,
): Promise<Recipe> {
  await ctx.knex.transaction(async (trx) => {
    const row = await trx('recipes').where({ id }).first()
    if (!row) throw notFound('Recipe')
    assertRevision('recipes', row, body.revision)
    const merged = {
      instrument: body.instrument ?? row.instrument,
      stringName: body.stringName ?? row.string_name,
    }
    const names = TUNINGS[merged.instrument as Recipe['instrument']].map((s) => s.name)
    if (!names.includes(merged.stringName))
      throw validationFailed('Some fields need attention', {
        fields: { stringName: [`A ${merged.instrument} has the strings ${names.join(', ')}`] },
      })
    if (body.name !== undefined || body.version !== undefined)
      await checkUnique(trx, body.name ?? row.name, body.version ?? row.version, id)
    if (body.parentId !== undefined) await checkParent(trx, id, body.parentId)
    const changes = columns(body as Partial<NewRecipe>)
    const changed = Object.entries(body as Record<string, unknown>)
      .filter(([field, value]) => {
        const column = Object.keys(columns({ [field]: value } as Partial<NewRecipe>))[0]
        return column !== undefined && String(row[column]) !== String(changes[column])
      })
      .map(([field]) => field)
    await assertRecipeChangeAllowed(trx, id, changed)
    await updateAtRevision(trx, 'recipes', id, body.revision, {
      ...changes,
      updated_at: ctx.clock.now().toISOString(),
    })
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'recipe.updated',
      targetType: 'recipe',
      targetId: id,
      details: { fields: Object.keys(body).filter((f) => f !== 'revision') },
    })
  })
  return getRecipe(ctx.knex, id)
}
