import type { Knex } from 'knex'
import type { ClipSetSpec } from '../../shared/schemas/sessions'
import { clipIdsOfSet } from './rows'

// Which sessions use a clip or a recipe. A used item is frozen: what it is cannot change under
// the answers already given (or about to be given) about it, and it is archived, not deleted.

export interface UsingSession {
  id: number
  name: string
  status: 'draft' | 'open' | 'closed'
  /** Aging studies repeat a name at each time point; the label tells them apart. */
  time_point_label: string | null
}

/** Sessions whose design names the clip or the recipe, oldest first. */
export async function sessionsUsing(
  db: Knex,
  item: { clipId: number } | { recipeId: number },
): Promise<UsingSession[]> {
  const rows: (UsingSession & { recipe_ids: string; clip_sets: string })[] = await db('sessions')
    .orderBy('id')
    .select('id', 'name', 'status', 'time_point_label', 'recipe_ids', 'clip_sets')
  return rows
    .filter((r) =>
      'clipId' in item
        ? (JSON.parse(r.clip_sets) as ClipSetSpec[]).some((s) =>
            clipIdsOfSet(s).includes(item.clipId),
          )
        : (JSON.parse(r.recipe_ids) as number[]).includes(item.recipeId),
    )
    .map(({ id, name, status, time_point_label }) => ({ id, name, status, time_point_label }))
}

/** Sessions that have been opened: their players may already have been served the item. */
export const opened = (sessions: UsingSession[]) => sessions.filter((s) => s.status !== 'draft')

/** "«Name» (open), «Other» (closed)": how a refusal names the sessions in the way. */
export const namesOf = (sessions: UsingSession[]) =>
  sessions
    .map((s) => `“${s.name}${s.time_point_label ? `, ${s.time_point_label}` : ''}” (${s.status})`)
    .join(', ')
