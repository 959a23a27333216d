import { refixSessionPlans } from './servedRecord'
import { randomBytes } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { assertPossible, reviewDesign } from './designReview'
import {
  answersCount,
  designOf,
  loadSession,
  summaryQuery,
  toSummary,
  type SessionRow,
  type StoredDesign,
  type SummaryRow,
} from './rows'
import {
  LOCKED_DESIGN_FIELDS,
  type SessionDesignParsed,
  type SessionDetail,
  type SessionSummary,
  type UpdateSessionBody,
} from '../../shared/schemas/sessions'

export const newSeed = () => randomBytes(8).toString('hex')

export async function listSessions(knex: Knex): Promise<SessionSummary[]> {
  const rows: SummaryRow[] = await summaryQuery(knex)
    .orderBy('s.created_at', 'desc')
    .orderBy('s.id', 'desc')
  return rows.map(toSummary)
}

export async function getSession(knex: Knex, id: number, now: Date): Promise<SessionDetail> {
  const s: SummaryRow | undefined = await summaryQuery(knex).where('s.id', id).first()
  if (!s) throw notFound('Session')
  const design = designOf(s)
  // A draft's passed deadline is worth a warning; a running session's is simply its end.
  const review = await reviewDesign(knex, { ...design, deadline: s.deadline }, null)
  const warnings = [...Object.values(review.errors).flat(), ...review.warnings]
  if (s.status === 'draft' && s.deadline < now.toISOString().slice(0, 10))
    warnings.push('The deadline has passed: choose a new one before opening')
  const answers = await answersCount(knex, id)
  const rootId = s.parent_session_id ?? s.id
  const family: Pick<SessionRow, 'id' | 'time_point_label' | 'status'>[] = await knex('sessions')
    .where({ id: rootId })
    .orWhere({ parent_session_id: rootId })
    .orderBy('created_at')
    .orderBy('id')
    .select('id', 'time_point_label', 'status')
  return {
    ...toSummary(s),
    purpose: s.purpose,
    recipeIds: design.recipeIds,
    clipSets: review.clipSets,
    attributes: design.attributes,
    duplicates: s.duplicates,
    allowNoPreference: Boolean(s.allow_no_preference),
    instructions: s.instructions,
    reminderDaysBefore: s.reminder_days_before,
    seed: s.seed,
    locked: answers > 0,
    answersCount: answers,
    trialCount: review.trialCount,
    warnings,
    recordProblem: s.record_problem ?? null,
    recipes: review.recipes,
    timePoints: family.map((f) => ({ id: f.id, label: f.time_point_label, status: f.status })),
    openedAt: s.opened_at,
    closedAt: s.closed_at,
  }
}

function storedOf(body: SessionDesignParsed, seed: string): StoredDesign & { deadline: string } {
  return {
    format: body.format,
    recipeIds: body.recipeIds,
    clipSets: body.clipSets,
    attributes: body.attributes,
    duplicates: body.duplicates,
    seed,
    deadline: body.deadline,
  }
}

export async function createSession(
  ctx: AppContext,
  body: SessionDesignParsed,
  actor: Actor,
  extra: { parentSessionId?: number } = {},
): Promise<SessionDetail> {
  const now = ctx.clock.now()
  const seed = newSeed()
  assertPossible(await reviewDesign(ctx.knex, storedOf(body, seed), now))
  const id = await ctx.knex.transaction(async (trx) => {
    const [id] = await trx('sessions').insert({
      name: body.name,
      purpose: body.purpose,
      format: body.format,
      status: 'draft',
      seed,
      recipe_ids: JSON.stringify(body.recipeIds),
      clip_sets: JSON.stringify(body.clipSets),
      attributes: JSON.stringify(body.attributes),
      duplicates: body.duplicates,
      allow_no_preference: body.allowNoPreference,
      instructions: body.instructions,
      deadline: body.deadline,
      reminder_days_before: body.reminderDaysBefore,
      parent_session_id: extra.parentSessionId ?? null,
      time_point_label: body.timePointLabel,
      created_by: actor.userId,
      created_at: now.toISOString(),
      updated_at: now.toISOString(),
    })
    await recordAudit(trx, now, actor, {
      action: extra.parentSessionId ? 'session.time_point_added' : 'session.created',
      targetType: 'session',
      targetId: id as number,
      details: { format: body.format, recipes: body.recipeIds.length },
    })
    return id as number
  })
  return getSession(ctx.knex, id, now)
}

const COLUMNS: Record<keyof UpdateSessionBody, keyof SessionRow> = {
  name: 'name',
  purpose: 'purpose',
  format: 'format',
  recipeIds: 'recipe_ids',
  clipSets: 'clip_sets',
  attributes: 'attributes',
  duplicates: 'duplicates',
  allowNoPreference: 'allow_no_preference',
  instructions: 'instructions',
  deadline: 'deadline',
  reminderDaysBefore: 'reminder_days_before',
  timePointLabel: 'time_point_label',
}

const JSON_FIELDS = new Set(['recipeIds', 'clipSets', 'attributes'])

export async function updateSession(
  ctx: AppContext,
  id: number,
  body: UpdateSessionBody,
  actor: Actor,
): Promise<SessionDetail> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const row = await loadSession(trx, id)
    if (row.status === 'closed') throw conflict('This session is closed and can no longer change')
    const changes: Record<string, unknown> = {}
    for (const [field, value] of Object.entries(body) as [keyof UpdateSessionBody, unknown][]) {
      if (value === undefined) continue
      const stored = JSON_FIELDS.has(field) ? JSON.stringify(value) : value
      const current = row[COLUMNS[field]]
      const same = field === 'allowNoPreference' ? Boolean(current) === value : current === stored
      if (!same) changes[COLUMNS[field]] = stored
    }
    const touched = Object.keys(changes)
    if (touched.length === 0) return
    const lockedTouched = LOCKED_DESIGN_FIELDS.filter((f) => touched.includes(COLUMNS[f]))
    if (lockedTouched.length > 0 && (await answersCount(trx, id)) > 0) {
      throw conflict(
        'Players have already answered, so the design is locked; instructions, deadline and names can still change',
        Object.fromEntries(
          lockedTouched.map((f) => [f, ['Locked: players have already answered']]),
        ),
      )
    }
    if (lockedTouched.length > 0 || changes.deadline !== undefined) {
      const merged = designOf({ ...row, ...changes } as SessionRow)
      const deadline = (changes.deadline as string | undefined) ?? row.deadline
      const review = await reviewDesign(
        trx,
        { ...merged, deadline },
        changes.deadline !== undefined ? now : null,
      )
      assertPossible(review)
    }
    await trx('sessions')
      .where({ id })
      .update({ ...changes, updated_at: now.toISOString() })
    // Nobody has answered yet (the design would be locked): what players will be served follows.
    if (lockedTouched.length > 0 && row.status === 'open')
      await refixSessionPlans(trx, await loadSession(trx, id), now)
    await recordAudit(trx, now, actor, {
      action: 'session.updated',
      targetType: 'session',
      targetId: id,
      details: {
        fields: Object.keys(body).filter((f) =>
          touched.includes(COLUMNS[f as keyof UpdateSessionBody]),
        ),
      },
    })
  })
  return getSession(ctx.knex, id, now)
}

export async function openSession(
  ctx: AppContext,
  id: number,
  actor: Actor,
): Promise<SessionDetail> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const row = await loadSession(trx, id)
    if (row.status !== 'draft')
      throw conflict(
        row.status === 'open'
          ? 'This session is already open'
          : 'A closed session cannot open again',
      )
    assertPossible(await reviewDesign(trx, { ...designOf(row), deadline: row.deadline }, now))
    await trx('sessions')
      .where({ id })
      .update({ status: 'open', opened_at: now.toISOString(), updated_at: now.toISOString() })
    await recordAudit(trx, now, actor, {
      action: 'session.opened',
      targetType: 'session',
      targetId: id,
    })
  })
  return getSession(ctx.knex, id, now)
}

export async function closeSession(
  ctx: AppContext,
  id: number,
  actor: Actor,
): Promise<SessionDetail> {
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    const row = await loadSession(trx, id)
    if (row.status !== 'open')
      throw conflict(
        row.status === 'closed'
          ? 'This session is already closed'
          : 'Only an open session can be closed',
      )
    await trx('sessions')
      .where({ id })
      .update({ status: 'closed', closed_at: now.toISOString(), updated_at: now.toISOString() })
    await recordAudit(trx, now, actor, {
      action: 'session.closed',
      targetType: 'session',
      targetId: id,
    })
  })
  return getSession(ctx.knex, id, now)
}
