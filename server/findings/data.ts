import type { Knex } from 'knex'
import { conflict } from '../errors'
import type { AttributeSpec } from '../../shared/schemas/sessions'
import type { RecipeRef } from '../../shared/schemas/findings'
import {
  emptyResolved,
  resolvePlayerAnswers,
  type ResolvedAnswers,
  type AnswerRow,
} from './answersToRatings'
import { sessionServedTrials } from '../sessions/servedRecord'
import { CORRELATED_MEASURES, type ClipMeasureRow } from './objective'
import { designOf, loadSession, type SessionRow } from '../sessions/rows'
import { HEADPHONE_EXCLUSION_REASON, headphoneScreening } from './headphoneExclusions'

export interface SessionPlayer {
  playerId: number
  code: string
  level: string
  instruments: string[]
  started: boolean
  done: boolean
  /** Stored answers, readable or not. */
  answered: number
  /** The analyst's reason, or the headphone rule's; null when the player counts. */
  exclusionReason: string | null
  /** Who left the player out: an analyst, or the failed headphone check by default. */
  excludedBy: 'analyst' | 'headphone' | null
  /** The headphone check failed, whether or not an analyst took the player back in. */
  headphoneFailed: boolean
}

/** Everything one session's findings are computed from, with answers already in recipes. */
export interface FindingsData {
  session: SessionRow
  recipes: RecipeRef[]
  attributes: AttributeSpec[]
  players: SessionPlayer[]
  resolved: ResolvedAnswers
  answers: number
  lastAnswerAt: string | null
}

interface InvitationJoin {
  player_id: number
  player_index: number
  started_at: string | null
  completed_at: string | null
  code: string
  level: string
  instruments: string
  reason: string | null
  invitation_id: number
}

/** Names as staff know them; a version number only where two versions share a name. */
export async function recipeRefs(db: Knex, ids: number[]): Promise<RecipeRef[]> {
  const rows: { id: number; name: string; version: number }[] = await db('recipes')
    .whereIn('id', ids)
    .select('id', 'name', 'version')
  const byId = new Map(rows.map((r) => [r.id, r]))
  return ids.map((id) => {
    const r = byId.get(id)
    if (!r) return { id, name: `Recipe ${id}` }
    const shared = rows.filter((o) => o.name === r.name).length > 1
    return { id, name: shared ? `${r.name} v${r.version}` : r.name }
  })
}

/** `rows`: also build the long-format rows of the answer export. */
export async function loadFindingsData(
  db: Knex,
  sessionId: number,
  options: { rows?: boolean } = {},
): Promise<FindingsData> {
  const session = await loadSession(db, sessionId)
  const design = designOf(session)
  // Revoked invitations are left out: the organisers withdrew them, answers and all.
  const invitations: InvitationJoin[] = await db('invitations as i')
    .join('players as p', 'p.id', 'i.player_id')
    .leftJoin('exclusions as x', function () {
      this.on('x.session_id', '=', 'i.session_id').andOn('x.player_id', '=', 'i.player_id')
    })
    .where('i.session_id', sessionId)
    .whereNull('i.revoked_at')
    .orderBy('i.player_index')
    .select(
      'i.id as invitation_id',
      'i.player_id',
      'i.player_index',
      'i.started_at',
      'i.completed_at',
      'p.code',
      'p.level',
      'p.instruments',
      'x.reason',
    )
  const stored: {
    id: number
    invitation_id: number
    trial_index: number
    payload: string
    answered_at: string
  }[] =
    invitations.length === 0
      ? []
      : await db('answers')
          .whereIn(
            'invitation_id',
            invitations.map((i) => i.invitation_id),
          )
          .orderBy(['invitation_id', 'trial_index'])
          // Only the player's own answer is read here (the served truth comes from the served
          // record): SQLite cuts it out, so a large panel parses a third of the text. Older
          // shapes without `given`, and text that is not JSON, come whole for readAnswer.
          .select(
            'id',
            'invitation_id',
            'trial_index',
            db.raw(
              "CASE WHEN json_valid(payload) THEN coalesce(json_extract(payload, '$.given'), payload) ELSE payload END AS payload",
            ),
            'answered_at',
          )
  const byInvitation = new Map<number, AnswerRow[]>()
  for (const a of stored) {
    const list = byInvitation.get(a.invitation_id) ?? []
    list.push({
      id: a.id,
      trialIndex: a.trial_index,
      payload: a.payload,
      answeredAt: a.answered_at,
    })
    byInvitation.set(a.invitation_id, list)
  }

  const resolved = emptyResolved(options.rows ?? false)
  const keys = design.attributes.map((a) => a.key)
  if (stored.length > 0) {
    // Each answer is read through what that player was served, as recorded at invitation.
    const served = await sessionServedTrials(db, session)
    for (const inv of invitations) {
      const answers = byInvitation.get(inv.invitation_id)
      if (!answers) continue
      const trials = served.get(inv.invitation_id)
      if (!trials)
        throw conflict(`Invitation ${inv.invitation_id} has answers but no served record`)
      resolvePlayerAnswers(resolved, inv.code, trials, answers, keys)
    }
  }

  const screening = await headphoneScreening(db, session)
  return {
    session,
    recipes: await recipeRefs(db, design.recipeIds),
    attributes: design.attributes,
    players: invitations.map((i) => {
      const headphoneFailed = screening.failed.has(i.invitation_id)
      const byRule = headphoneFailed && !screening.includedBack.has(i.player_id)
      return {
        playerId: i.player_id,
        code: i.code,
        level: i.level,
        instruments: JSON.parse(i.instruments) as string[],
        started: Boolean(i.started_at) || byInvitation.has(i.invitation_id),
        done: Boolean(i.completed_at),
        answered: byInvitation.get(i.invitation_id)?.length ?? 0,
        // The analyst's own reason stands first: it is the more specific one.
        exclusionReason: i.reason ?? (byRule ? HEADPHONE_EXCLUSION_REASON : null),
        excludedBy: i.reason !== null ? 'analyst' : byRule ? 'headphone' : null,
        headphoneFailed,
      }
    }),
    resolved,
    answers: stored.length,
    lastAnswerAt: stored.reduce<string | null>(
      (latest, a) => (latest === null || a.answered_at > latest ? a.answered_at : latest),
      null,
    ),
  }
}

/** The clip measures objective-vs-perceived compares with, as stored at upload. */
export async function clipMeasures(db: Knex, clipIds: number[]): Promise<ClipMeasureRow[]> {
  if (clipIds.length === 0) return []
  const columns = CORRELATED_MEASURES.map((m) => m.column)
  return (await db('clips')
    .whereIn('id', clipIds)
    .select('id', 'recipe_id', ...columns)) as ClipMeasureRow[]
}
