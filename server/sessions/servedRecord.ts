import type { Knex } from 'knex'
import type { PlannedTrial } from '../design/index.ts'
import { conflict } from '../errors'
import { servingsOf } from '../formats/answers'
import { planFor, sessionInput } from './plans'
import type { SessionRow } from './rows'

// The served record: what each invited player is served, trial by trial, fixed as data when
// the invitation is made (sessions take invitations only once open). Findings, exports,
// labels and the player's own pages read answers through it, never through a plan rebuilt
// from today's clips, so no later edit of a clip, a recipe or the design code can move an
// answer onto another recording.

export interface ServedPlan {
  trials: PlannedTrial[]
  /** The level change of each clip's blind rendition when the plan was fixed, in dB. */
  renditionGainDb: Record<string, number>
}

/** The plan player `playerIndex` of the session is to be served, as of now. */
export async function planToServe(
  db: Knex,
  session: SessionRow,
  playerIndex: number,
): Promise<ServedPlan> {
  const trials = planFor(await sessionInput(db, session), playerIndex).trials
  const clipIds = [...new Set(trials.flatMap((t) => servingsOf(t).map((c) => Number(c.clipId))))]
  const gains: { id: number; rendition_gain_db: number }[] = clipIds.length
    ? await db('clips').whereIn('id', clipIds).select('id', 'rendition_gain_db')
    : []
  return {
    trials,
    renditionGainDb: Object.fromEntries(gains.map((g) => [String(g.id), g.rendition_gain_db])),
  }
}

/** Fixes (or, while nobody has answered, re-fixes) what these invitations will be served. */
export async function fixServedPlans(
  trx: Knex,
  session: SessionRow,
  invitations: { id: number; player_index: number }[],
  now: Date,
): Promise<void> {
  for (const inv of invitations) {
    const plan = await planToServe(trx, session, inv.player_index)
    await trx('served_plans')
      .insert({
        invitation_id: inv.id,
        session_id: session.id,
        trials: JSON.stringify(plan),
        fixed_at: now.toISOString(),
      })
      .onConflict('invitation_id')
      .merge(['trials', 'fixed_at'])
  }
}

/** Re-fixes every invitation's plan of a session whose design changed before any answer. */
export async function refixSessionPlans(trx: Knex, session: SessionRow, now: Date) {
  const invitations: { id: number; player_index: number }[] = await trx('invitations')
    .where({ session_id: session.id })
    .select('id', 'player_index')
  await fixServedPlans(trx, session, invitations, now)
}

function parsePlan(text: string, invitationId: number): ServedPlan {
  const plan = JSON.parse(text) as ServedPlan
  if (!Array.isArray(plan?.trials))
    throw new Error(`The served record of invitation ${invitationId} has no trials`)
  return plan
}

/** Says why a session's answers cannot be read, when its record could not be rebuilt. */
export function assertSoundRecord(session: SessionRow): void {
  if (session.record_problem)
    throw conflict(`This session's served record could not be rebuilt: ${session.record_problem}`)
}

/** The trials an invitation was served; a conflict when the session has no sound record. */
export async function servedTrials(
  db: Knex,
  session: SessionRow,
  invitationId: number,
): Promise<PlannedTrial[]> {
  assertSoundRecord(session)
  const row: { trials: string } | undefined = await db('served_plans')
    .where({ invitation_id: invitationId })
    .first('trials')
  if (!row) throw conflict('This invitation has no served record yet')
  return parsePlan(row.trials, invitationId).trials
}

/** Every invitation's served trials in one session, by invitation id. */
export async function sessionServedTrials(
  db: Knex,
  session: SessionRow,
): Promise<Map<number, PlannedTrial[]>> {
  assertSoundRecord(session)
  const rows: { invitation_id: number; trials: string }[] = await db('served_plans')
    .where({ session_id: session.id })
    .select('invitation_id', 'trials')
  return new Map(rows.map((r) => [r.invitation_id, parsePlan(r.trials, r.invitation_id).trials]))
}
