import { randomBytes } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import type { PlannedTrial } from '../design/index.ts'
import { assertConsent, openForAnswers, type PlayerInvitationRow } from './access'
import { servedTrials } from '../sessions/servedRecord'
import { playerFacing } from '../sessions/plans'
import { formatOf } from '../formats/index.ts'
import { servingsOf } from '../formats/answers'
import type { SessionRow } from '../sessions/rows'
import type { PlayerClipView, PlayerPlanView, PlayerTrialView } from '../../shared/schemas/rating'

/** Waveforms are drawn on a phone at most this many columns wide; more is only bytes. */
export const PEAK_BUCKETS = 600

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

export function downsamplePeaks(
  peaks: { min: number[]; max: number[] },
  buckets = PEAK_BUCKETS,
): { min: number[]; max: number[] } {
  const n = Math.min(peaks.min.length, peaks.max.length)
  if (n <= buckets) return { min: peaks.min.slice(0, n), max: peaks.max.slice(0, n) }
  const min: number[] = []
  const max: number[] = []
  for (let b = 0; b < buckets; b++) {
    const from = Math.floor((b * n) / buckets)
    const to = Math.floor(((b + 1) * n) / buckets)
    let lo = Infinity
    let hi = -Infinity
    for (let i = from; i < to; i++) {
      lo = Math.min(lo, peaks.min[i])
      hi = Math.max(hi, peaks.max[i])
    }
    min.push(lo)
    max.push(hi)
  }
  return { min, max }
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

interface ClipFacts {
  duration: number
  peaks: { min: number[]; max: number[] }
}

async function clipFacts(db: Knex, ids: number[]): Promise<Map<number, ClipFacts>> {
  if (ids.length === 0) return new Map()
  const rows: { id: number; duration_s: number; peaks: string }[] = await db('clips')
    .whereIn('id', ids)
    .select('id', 'duration_s', 'peaks')
  return new Map(
    rows.map((r) => [
      r.id,
      { duration: r.duration_s, peaks: downsamplePeaks(JSON.parse(r.peaks) as ClipFacts['peaks']) },
    ]),
  )
}

export async function playerPlanView(ctx: AppContext, token: string): Promise<PlayerPlanView> {
  const { inv, session } = await openForAnswers(ctx, token)
  assertConsent(inv)
  const trials = await plannedTrials(ctx.knex, session, inv)
  const servings = trials
    .flatMap(servingsOf)
    .map((c) => ({ clipId: Number(c.clipId), code: c.code }))
  const refs = await audioRefs(ctx.knex, inv.id, servings)
  const facts = await clipFacts(ctx.knex, [...new Set(servings.map((s) => s.clipId))])
  const screens = screensOf(trials)

  const clipView = (c: { clipId: string | number; code: number }): PlayerClipView => {
    const id = Number(c.clipId)
    const f = facts.get(id)
    return {
      code: c.code,
      audioUrl: `/api/player/audio/${refs.get(servingKey(id, c.code))}`,
      duration: f?.duration ?? 0,
      peaks: f?.peaks ?? { min: [], max: [] },
    }
  }
  const format = formatOf(session.format)
  const trialView = (t: PlannedTrial, index: number): PlayerTrialView => {
    const clips = servingsOf(t).map(clipView)
    return {
      index,
      kind: t.kind,
      screen: screens[index],
      clips: format.alikeServings ? alike(clips) : clips,
      setCode: format.setCode(t),
    }
  }

  return { ...playerFacing(session), trials: trials.map(trialView) }
}

/**
 * Two of a triangle's samples are the same recording: identical waveforms or lengths would
 * point at the odd one without listening. Each sample gets the longest length and no drawing.
 */
function alike(clips: PlayerClipView[]): PlayerClipView[] {
  const duration = Math.max(...clips.map((c) => c.duration))
  return clips.map((c) => ({ ...c, duration, peaks: { min: [], max: [] } }))
}
