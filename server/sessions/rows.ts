import { formatOf } from '../formats/index.ts'
import type { Knex } from 'knex'
import { notFound } from '../errors'
import type { SessionDesignInput } from '../design/index.ts'
import type {
  AttributeSpec,
  ClipSetSpec,
  SessionFormat,
  SessionStatus,
  SessionSummary,
  PAdjustment,
} from '../../shared/schemas/sessions'

export interface SessionRow {
  id: number
  name: string
  purpose: string
  format: SessionFormat
  status: SessionStatus
  seed: string
  recipe_ids: string
  clip_sets: string
  attributes: string
  duplicates: number
  allow_no_preference: number | boolean
  /** 'holm' or 'bh': how the findings adjust each family of pairs. */
  adjustment: PAdjustment
  target_difference: number | null
  /** The only session words players see; name and purpose stay with staff. */
  player_title: string
  player_message: string
  deadline: string
  reminder_days_before: number | null
  parent_session_id: number | null
  time_point_label: string | null
  /** Why the served record of an older session could not be rebuilt; null when it is sound. */
  record_problem?: string | null
  /** Set when the designer opened with recipes served twice from one take. */
  same_take_accepted_at?: string | null
  /** Who accepted it: the staff member's e-mail at the time. */
  same_take_accepted_by?: string | null
  created_by: number | null
  created_at: string
  updated_at: string
  opened_at: string | null
  closed_at: string | null
  /** Moves on with every change; an edit names the one it was loaded at. */
  revision: number
}

/** The player title and message, as the design review checks them. */
export const playerWordsOf = (r: Pick<SessionRow, 'player_title' | 'player_message'>) => ({
  playerTitle: r.player_title,
  playerMessage: r.player_message,
})

/** The design as stored, decoded from its JSON columns. */
export interface StoredDesign {
  format: SessionFormat
  recipeIds: number[]
  clipSets: ClipSetSpec[]
  attributes: AttributeSpec[]
  duplicates: number
  seed: string
}

export const designOf = (r: SessionRow): StoredDesign => ({
  format: r.format,
  recipeIds: JSON.parse(r.recipe_ids) as number[],
  clipSets: JSON.parse(r.clip_sets) as ClipSetSpec[],
  attributes: JSON.parse(r.attributes) as AttributeSpec[],
  duplicates: r.duplicates,
  seed: r.seed,
})

/**
 * The input server/design plans from. Clips are paired with their recipes here, from the
 * database, so a set spec can never claim a clip belongs to another recipe.
 */
export function designInput(
  d: Pick<StoredDesign, 'format' | 'recipeIds' | 'clipSets' | 'duplicates' | 'seed'>,
  recipeOfClip: ReadonlyMap<number, number>,
): SessionDesignInput {
  return {
    format: d.format,
    recipes: d.recipeIds,
    clipSets:
      formatOf(d.format).clipSets === 'none'
        ? []
        : d.clipSets.map((s) => {
            const clip = (clipId: number) => ({ clipId, recipeId: recipeOfClip.get(clipId) ?? -1 })
            const twins = (s.twinClipIds ?? []).map(clip)
            // Designs without second takes keep the shape (and so the codes) they always had.
            return twins.length
              ? { excerptKey: s.key, clips: s.clipIds.map(clip), twins }
              : { excerptKey: s.key, clips: s.clipIds.map(clip) }
          }),
    duplicates: d.duplicates,
    seed: d.seed,
  }
}

/** Every clip a set spec plays: its clips and their second takes. */
export const clipIdsOfSet = (s: ClipSetSpec): number[] => [...s.clipIds, ...(s.twinClipIds ?? [])]

export async function clipRecipes(db: Knex, clipSets: ClipSetSpec[]): Promise<Map<number, number>> {
  const ids = [...new Set(clipSets.flatMap(clipIdsOfSet))]
  if (ids.length === 0) return new Map()
  const rows: { id: number; recipe_id: number }[] = await db('clips')
    .whereIn('id', ids)
    .select('id', 'recipe_id')
  return new Map(rows.map((r) => [r.id, r.recipe_id]))
}

export async function loadSession(db: Knex, id: number): Promise<SessionRow> {
  const row: SessionRow | undefined = await db('sessions').where({ id }).first()
  if (!row) throw notFound('Session')
  return row
}

export async function answersCount(db: Knex, sessionId: number): Promise<number> {
  const [{ n }] = (await db('answers as a')
    .join('invitations as i', 'i.id', 'a.invitation_id')
    .where('i.session_id', sessionId)
    .count({ n: '*' })) as { n: number }[]
  return Number(n)
}

type SummaryRow = SessionRow & {
  invited_count: number
  done_count: number
  creator: string | null
}

export function summaryQuery(db: Knex) {
  return db('sessions as s')
    .leftJoin('users as u', 'u.id', 's.created_by')
    .select(
      's.*',
      'u.name as creator',
      db.raw(
        '(select count(*) from invitations i where i.session_id = s.id and i.revoked_at is null) as invited_count',
      ),
      db.raw(
        '(select count(*) from invitations i where i.session_id = s.id and i.completed_at is not null and i.revoked_at is null) as done_count',
      ),
    )
}

export const toSummary = (r: SummaryRow): SessionSummary => ({
  id: r.id,
  name: r.name,
  format: r.format,
  status: r.status,
  deadline: r.deadline,
  recipeCount: (JSON.parse(r.recipe_ids) as number[]).length,
  invitedCount: Number(r.invited_count),
  doneCount: Number(r.done_count),
  timePointLabel: r.time_point_label,
  parentSessionId: r.parent_session_id,
  createdBy: r.creator,
  createdById: r.created_by,
  createdAt: r.created_at,
})

export type { SummaryRow }
