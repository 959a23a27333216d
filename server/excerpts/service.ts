import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import type { CreateExcerptBody, Excerpt, UpdateExcerptBody } from '../../shared/schemas/clips'

interface ExcerptRow {
  id: number
  name: string
  description: string
  active: number | boolean
  clip_count: number
}

const toExcerpt = (r: ExcerptRow): Excerpt => ({
  id: r.id,
  name: r.name,
  description: r.description,
  active: Boolean(r.active),
  clipCount: Number(r.clip_count ?? 0),
})

function excerptQuery(knex: Knex) {
  return knex('excerpts as e')
    .leftJoin('clips as c', 'c.excerpt_id', 'e.id')
    .groupBy('e.id')
    .select('e.id', 'e.name', 'e.description', 'e.active')
    .count({ clip_count: 'c.id' })
}

export async function listExcerpts(knex: Knex): Promise<Excerpt[]> {
  const rows = (await excerptQuery(knex).orderBy('e.name')) as ExcerptRow[]
  return rows.map(toExcerpt)
}

async function assertNameFree(db: Knex, name: string, exceptId?: number) {
  const q = db('excerpts').whereRaw('lower(name) = lower(?)', [name])
  if (exceptId) q.whereNot({ id: exceptId })
  if (await q.first())
    throw conflict('An excerpt of this name exists', { name: ['Already listed'] })
}

export async function createExcerpt(
  ctx: AppContext,
  body: Required<CreateExcerptBody>,
  actor: Actor,
): Promise<Excerpt> {
  return ctx.knex.transaction(async (trx) => {
    await assertNameFree(trx, body.name)
    const [id] = await trx('excerpts').insert({
      name: body.name,
      description: body.description,
      active: true,
      created_at: ctx.clock.now().toISOString(),
    })
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'excerpts.added',
      targetType: 'excerpt',
      targetId: id as number,
    })
    return toExcerpt((await excerptQuery(trx).where('e.id', id).first()) as ExcerptRow)
  })
}

export async function updateExcerpt(
  ctx: AppContext,
  id: number,
  body: UpdateExcerptBody,
  actor: Actor,
): Promise<Excerpt> {
  return ctx.knex.transaction(async (trx) => {
    if (!(await trx('excerpts').where({ id }).first())) throw notFound('Excerpt')
    if (body.name !== undefined) await assertNameFree(trx, body.name, id)
    await trx('excerpts').where({ id }).update(body)
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'excerpts.updated',
      targetType: 'excerpt',
      targetId: id,
      details: { fields: Object.keys(body) },
    })
    return toExcerpt((await excerptQuery(trx).where('e.id', id).first()) as ExcerptRow)
  })
}
