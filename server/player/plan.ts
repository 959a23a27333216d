import { randomBytes } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import type { PlannedTrial } from '../design/index.ts'
import { assertConsent, openForAnswers, type PlayerInvitationRow } from './access'
import { servedTrials } from '../sessions/servedRecord'
import { playerFacing } from '../sessions/plans'
import { formatOf } from '../formats/index.ts'
import { servingsOf } from '../formats/answers'
import { clipIdsOfSet, designOf, type SessionRow } from '../sessions/rows'
import { setPicture, type Peaks, type ScreenPicture } from './picture'
import type { PlayerClipView, PlayerPlanView, PlayerTrialView } from '../../shared/schemas/rating'

// A player's served record is kept between their saves; the key changes whenever the session
// row does, so a design edited before any answer is never served from an old record.
const plans = new Map<string, PlannedTrial[]>()
const PLANS_MAX = 2000

/** This player's trials in serving order, with the server-side truth behind every code. */
export async function plannedTrials(
  db: Knex,
  session: SessionRow,
  inv: Pick<PlayerInvitationRow, 'id'>,
): Promise<PlannedTrial[]> {
  const key = `${inv.id}:${session.updated_at}`
  const hit = plans.get(key)
  if (hit) return hit
  const trials = await servedTrials(db, session, inv.id)
  plans.set(key, trials)
  if (plans.size > PLANS_MAX) plans.delete(plans.keys().next().value!)
  return trials
}

/**
 * Consecutive first showings of one matched set are rated side by side, so the player can
 * switch between them; a hidden repeat stands alone, or sitting beside its twin would show it.
 */
export function screensOf(trials: readonly PlannedTrial[]): number[] {
  let screen = -1
  let previous: string | null = null
  return trials.map((t) => {
    const set = formatOf(t.kind).screenGroup(t)
    if (set === null || set !== previous) screen++
    previous = set
    return screen
  })
}

const servingKey = (clipId: number, code: number) => `${clipId}/${code}`

/** 144 random bits: unguessable, and nothing in it can be read back. */
const newRef = () => randomBytes(18).toString('base64url')

/**
 * The opaque audio address of every serving in the plan, made on the first fetch and kept, so
 * a reopened link plays from the same addresses (and the browser's cache still helps).
 */
export async function audioRefs(
  db: Knex,
  invitationId: number,
  servings: { clipId: number; code: number }[],
): Promise<Map<string, string>> {
  const load = async () => {
    const rows: { ref: string; clip_id: number; code: number }[] = await db('player_audio_refs')
      .where({ invitation_id: invitationId })
      .select('ref', 'clip_id', 'code')
    return new Map(rows.map((r) => [servingKey(r.clip_id, r.code), r.ref]))
  }
  const known = await load()
  const missing = servings.filter((s) => !known.has(servingKey(s.clipId, s.code)))
  if (missing.length === 0) return known
  const rows = [...new Map(missing.map((s) => [servingKey(s.clipId, s.code), s])).values()].map(
    (s) => ({ ref: newRef(), invitation_id: invitationId, clip_id: s.clipId, code: s.code }),
  )
  // Two first fetches at once: the loser's rows are dropped and both read the winner's.
  for (let i = 0; i < rows.length; i += 200)
    await db('player_audio_refs')
      .insert(rows.slice(i, i + 200))
      .onConflict(['invitation_id', 'clip_id', 'code'])
      .ignore()
  return load()
}

/**
 * One picture per matched set, keyed by every clip of the set (twins too), so every screen of
 * a set draws the same envelope whichever code is selected. The design's sets are locked once
 * anyone has answered, so the picture a player sees does not change under them.
 */
async function setPictures(
  db: Knex,
  session: SessionRow,
): Promise<Map<number, ScreenPicture | null>> {
  const sets = designOf(session).clipSets.map(clipIdsOfSet)
  const ids = [...new Set(sets.flat())]
  if (ids.length === 0) return new Map()
  const rows: {
    id: number
    duration_s: number
    peaks: string
    rendition_gain_db: number | null
    rendition_duration_s: number | null
  }[] = await db('clips')
    .whereIn('id', ids)
    .select('id', 'duration_s', 'peaks', 'rendition_gain_db', 'rendition_duration_s')
  const facts = new Map(
    rows.map((r) => [
      r.id,
      {
        duration: r.duration_s,
        peaks: JSON.parse(r.peaks) as Peaks,
        gainDb: r.rendition_gain_db ?? 0,
      },
    ]),
  )
  // Renditions of a set share one length; the picture spans it (older rows: the shortest take).
  const lengthOf = new Map(rows.map((r) => [r.id, r.rendition_duration_s]))
  const byClip = new Map<number, ScreenPicture | null>()
  for (const set of sets) {
    const lengths = set.map((id) => lengthOf.get(id)).filter((d): d is number => !!d)
    const picture = setPicture(
      set.flatMap((id) => facts.get(id) ?? []),
      lengths.length ? Math.min(...lengths) : undefined,
    )
    for (const id of set) byClip.set(id, picture)
  }
  return byClip
}

export async function playerPlanView(ctx: AppContext, token: string): Promise<PlayerPlanView> {
  const { inv, session } = await openForAnswers(ctx, token)
  assertConsent(inv)
  const trials = await plannedTrials(ctx.knex, session, inv)
  const servings = trials
    .flatMap(servingsOf)
    .map((c) => ({ clipId: Number(c.clipId), code: c.code }))
  const refs = await audioRefs(ctx.knex, inv.id, servings)
  const pictures = await setPictures(ctx.knex, session)
  const screens = screensOf(trials)

  // A code and an opaque address: no length, level or picture of its own.
  const clipView = (c: { clipId: string | number; code: number }): PlayerClipView => ({
    code: c.code,
    audioUrl: `/api/player/audio/${refs.get(servingKey(Number(c.clipId), c.code))}`,
  })
  const format = formatOf(session.format)
  const trialView = (t: PlannedTrial, index: number): PlayerTrialView => {
    const served = servingsOf(t)
    return {
      index,
      kind: t.kind,
      screen: screens[index],
      clips: served.map(clipView),
      picture: served.length ? (pictures.get(Number(served[0].clipId)) ?? null) : null,
      setCode: format.setCode(t),
    }
  }

  return { ...playerFacing(session), trials: trials.map(trialView) }
}
