import type { Knex } from 'knex'
import { DesignError, type PlannedTrial, type SessionDesignInput } from '../server/design/index.ts'
import { buildPlayerPlan, sessionCodes } from '../server/formats/index.ts'
import { servingsOf } from '../server/formats/answers'

// Writes the served record of every invitation made before records were kept, by rebuilding
// its plan from the session's seed, as findings did until now. The order design it calls is
// pinned by tests/server/design/pinned.test.ts, so it gives what those players were served.
// A plan is only written when every stored answer agrees with it (codes, clips, recipes); a
// session where one does not, or whose design no longer builds, is marked with the reason and
// left without a record, so its page says so instead of guessing.

interface SessionRow {
  id: number
  format: SessionDesignInput['format']
  seed: string
  recipe_ids: string
  clip_sets: string
  duplicates: number
}

interface ServedClip {
  code: number
  clipId: number
  recipeId: number
}

/** Why an answer's own record of what it was served disagrees with the rebuilt trial. */
function disagreement(trial: PlannedTrial | undefined, payload: string): string | null {
  if (!trial) return 'its trial is not in the rebuilt plan'
  let served: { kind?: string; clips?: ServedClip[]; setCode?: number | null } | undefined
  try {
    served = (JSON.parse(payload) as { served?: typeof served }).served
  } catch {
    return null
  }
  // Answers stored before they carried what was served cannot be compared; the plan stands.
  if (!served) return null
  if (served.kind !== trial.kind) return `it was a ${served.kind} trial`
  const rebuilt = servingsOf(trial).map((c) => [c.code, Number(c.clipId), Number(c.recipeId)])
  const stored = (served.clips ?? []).map((c) => [c.code, c.clipId, c.recipeId])
  if (JSON.stringify(rebuilt) !== JSON.stringify(stored)) return 'it was served other recordings'
  if ('code' in trial && served.setCode !== trial.code) return 'it was served another set'
  return null
}

export async function up(knex: Knex): Promise<void> {
  const sessions: SessionRow[] = await knex('sessions')
    .whereNot({ status: 'draft' })
    .select('id', 'format', 'seed', 'recipe_ids', 'clip_sets', 'duplicates')
  const now = new Date().toISOString()
  for (const s of sessions) {
    const invitations: { id: number; player_index: number }[] = await knex('invitations as i')
      .leftJoin('served_plans as sp', 'sp.invitation_id', 'i.id')
      .where('i.session_id', s.id)
      .whereNull('sp.invitation_id')
      .select('i.id', 'i.player_index')
    if (invitations.length === 0) continue

    const clipSets = JSON.parse(s.clip_sets) as { key: string; clipIds: number[] }[]
    const clips: { id: number; recipe_id: number; rendition_gain_db: number }[] = await knex(
      'clips',
    ).select('id', 'recipe_id', 'rendition_gain_db')
    const byId = new Map(clips.map((c) => [c.id, c]))
    const input: SessionDesignInput = {
      format: s.format,
      recipes: JSON.parse(s.recipe_ids) as number[],
      clipSets:
        s.format === 'playtest'
          ? []
          : clipSets.map((set) => ({
              excerptKey: set.key,
              clips: set.clipIds.map((clipId) => ({
                clipId,
                recipeId: byId.get(clipId)?.recipe_id ?? -1,
              })),
            })),
      duplicates: s.duplicates,
      seed: s.seed,
    }

    let problem: string | null = null
    const rows: { invitation_id: number; session_id: number; trials: string; fixed_at: string }[] =
      []
    try {
      const codes = sessionCodes(input)
      for (const inv of invitations) {
        const trials = buildPlayerPlan(input, inv.player_index, codes).trials
        const answers: { id: number; trial_index: number; payload: string }[] = await knex(
          'answers',
        )
          .where({ invitation_id: inv.id })
          .select('id', 'trial_index', 'payload')
        for (const a of answers) {
          const why = disagreement(trials[a.trial_index], a.payload)
          if (why) problem ??= `answer ${a.id} (trial ${a.trial_index + 1}) disagrees: ${why}`
        }
        const gains = Object.fromEntries(
          trials
            .flatMap((t) => servingsOf(t))
            .map((c) => [String(c.clipId), byId.get(Number(c.clipId))?.rendition_gain_db ?? 0]),
        )
        rows.push({
          invitation_id: inv.id,
          session_id: s.id,
          trials: JSON.stringify({ trials, renditionGainDb: gains }),
          fixed_at: now,
        })
      }
    } catch (err) {
      if (!(err instanceof DesignError)) throw err
      problem = `the design no longer builds (${err.message})`
    }
    if (problem) {
      await knex('sessions').where({ id: s.id }).update({ record_problem: problem })
      continue
    }
    for (let i = 0; i < rows.length; i += 100)
      await knex('served_plans').insert(rows.slice(i, i + 100))
  }
}

export async function down(knex: Knex): Promise<void> {
  // The records are the truth from here on; taking them away would lose nothing the schema
  // migration's down does not already drop.
  await knex('sessions').update({ record_problem: null })
}
