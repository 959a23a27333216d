/*
 * Creating a session and changing it. A design is checked before it is stored; a closed session
 * no longer changes, and once players have answered the design is locked (names, the player
 * title and message, and the deadline may still change). The words players see are checked
 * against the session's recipes on every change that could make them give a recipe away.
 */
import { randomBytes } from 'node:crypto'
import type { AppContext } from '../context'
import { conflict } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { refixSessionPlans } from './servedRecord'
import { assertPossible, reviewDesign } from './designReview'
import type { PlayerTexts } from './playerWords'
import {
  answersCount,
  designOf,
  loadSession,
  playerWordsOf,
  type SessionRow,
  type StoredDesign,
} from './rows'
import { getSession } from './read'
import { assertRevision, updateAtRevision } from '../lib/revision'
import {
  LOCKED_DESIGN_FIELDS,
  type SessionDesignParsed,
  type SessionDetail,
  type UpdateSessionBody,
} from '../../shared/schemas/sessions'

export const newSeed = () => randomBytes(8).toString('hex')

function storedOf(
  body: SessionDesignParsed,
  seed: string,
): StoredDesign & { deadline: string; playerWords: PlayerTexts } {
  return {
    format: body.format,
    recipeIds: body.recipeIds,
    clipSets: body.clipSets,
    attributes: body.attributes,
    duplicates: body.duplicates,
    seed,
    deadline: body.deadline,
    playerWords: { playerTitle: body.playerTitle, playerMessage: body.playerMessage },
  }
}

export async function createSession(
  ctx: AppContext,
  body: SessionDesignParsed,
  actor: Actor,
  /** A later time point belongs to the study's owner, whoever adds it (sessionAccess.ts). */
  extra: { parentSessionId?: number; ownerId?: number | null } = {},
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
      adjustment: body.adjustment,
      target_difference: body.targetDifference,
      player_title: body.playerTitle,
      player_message: body.playerMessage,
      deadline: body.deadline,
      reminder_days_before: body.reminderDaysBefore,
      parent_session_id: extra.parentSessionId ?? null,
      time_point_label: body.timePointLabel,
      created_by: extra.ownerId !== undefined ? extra.ownerId : actor.userId,
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

type DesignField = Exclude<keyof UpdateSessionBody, 'revision'>

const COLUMNS: Record<DesignField, keyof SessionRow> = {
  name: 'name',
  purpose: 'purpose',
  format: 'format',
  recipeIds: 'recipe_ids',
  clipSets: 'clip_sets',
  attributes: 'attributes',
  duplicates: 'duplicates',
  allowNoPreference: 'allow_no_preference',
  adjustment: 'adjustment',
  targetDifference: 'target_difference',
  playerTitle: 'player_title',
  playerMessage: 'player_message',
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
    assertRevision('sessions', row, body.revision)
    const { revision, ...fields } = body
    const changes: Record<string, unknown> = {}
    for (const [field, value] of Object.entries(fields) as [DesignField, unknown][]) {
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
        'Players have already answered, so the design is locked; names, player title and message, and deadline can still change',
        Object.fromEntries(
          lockedTouched.map((f) => [f, ['Locked: players have already answered']]),
        ),
      )
    }
    // Recipes and player words are checked together: new recipes can make old words telling.
    const wordsTouched = ['player_title', 'player_message'].some((c) => touched.includes(c))
    if (lockedTouched.length > 0 || changes.deadline !== undefined || wordsTouched) {
      const mergedRow = { ...row, ...changes } as SessionRow
      const deadline = (changes.deadline as string | undefined) ?? row.deadline
      const review = await reviewDesign(
        trx,
        { ...designOf(mergedRow), deadline, playerWords: playerWordsOf(mergedRow) },
        changes.deadline !== undefined ? now : null,
      )
      assertPossible(review)
    }
    await updateAtRevision(trx, 'sessions', id, revision, {
      ...changes,
      updated_at: now.toISOString(),
    })
    // Nobody has answered yet (the design would be locked): what players will be served follows.
    if (lockedTouched.length > 0 && row.status === 'open')
      await refixSessionPlans(trx, await loadSession(trx, id), now)
    await recordAudit(trx, now, actor, {
      action: 'session.updated',
      targetType: 'session',
      targetId: id,
      details: {
        fields: Object.keys(fields).filter((f) => touched.includes(COLUMNS[f as DesignField])),
      },
    })
  })
  return getSession(ctx.knex, id, now)
}
