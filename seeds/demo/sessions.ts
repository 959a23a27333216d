import { randomUUID } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../../server/context'
import { DEMO_STAFF } from '../../server/auth/demoAccounts'
import { createRandom, type BlindClip, type PlannedTrial } from '../../server/design/index.ts'
import { buildPlayerPlan } from '../../server/formats/index.ts'
import { newSeed } from '../../server/sessions/service'
import { sessionInput } from '../../server/sessions/plans'
import { loadInvitation, queueInvitationMail } from '../../server/invitations/rows'
import { loadSession } from '../../server/sessions/rows'
import { fixServedPlans } from '../../server/sessions/servedRecord'
import { storedAnswer } from '../../server/answers/stored'
import { DEFAULT_ATTRIBUTES, type SessionFormat } from '../../shared/schemas/sessions'
import { trialAnswer, type TrialAnswer } from '../../shared/schemas/rating'

/*
 * Demo sessions of Larchmere String Works in every state: a draft, an open rating session with
 * players part-way, a closed triangle test everybody finished, and a play-test followed over
 * time; and two closed sessions whose findings tell a story (a clear brightness effect, no
 * warmth difference, one player answering at random; a lean towards the light compound). The
 * open sessions' invitations go through the outbox, so they can be read in the Mailbox once the
 * server has delivered them to the local mail fake. Every answer is stored in the players' own
 * format: blind codes and attribute keys, never a recipe.
 */

const DAY = 86_400_000
const random = createRandom('larchmere-demo-answers')

interface DemoSession {
  name: string
  purpose: string
  format: SessionFormat
  status: 'draft' | 'open' | 'closed'
  recipes: string[]
  /** [excerpt, performer, instrument] of each matched set. */
  sets: [string, string, string][]
  duplicates: number
  deadlineDays: number
  instructions: string
  players: string[]
  /** Answers given per player, by invitation order; 'all' marks the player done. */
  progress: (number | 'all')[]
  label?: string
  parent?: string
  /** Rated answers follow DAMPING_PROFILE closely instead of a loose lean. */
  profiled?: boolean
  /** Invitation index of a player who answers at random (the reliability flag's demo). */
  randomPlayer?: number
}

const VIOLINISTS = ['ilse.marchetti', 'noor.halloran', 'saskia.lindqvist', 'wren.adebayo']
const MORE_VIOLINISTS = ['zelda.okonkwo', 'caspian.mbeki', 'freya.nakamura-holt', 'hana.castellane']
const CELLISTS = ['kofi.brandvold', 'tarek.villanueva', 'anselm.fairweather', 'emrys.kowalczyk']
const LISTENING_PANEL = [
  ...VIOLINISTS,
  ...MORE_VIOLINISTS,
  'lior.ferreira-quist',
  'yusuf.kaminski',
  'dalia.strand',
  'ivo.renshaw',
]
const AUREL = [
  'Aurel A bare',
  'Aurel A light compound',
  'Aurel A heavy compound',
  'Aurel A fibre wrap',
]

const SESSIONS: DemoSession[] = [
  {
    name: 'Aurel A compound weight: which do players prefer?',
    purpose: 'Does a heavier compound cost the A string its preference among professionals?',
    format: 'pair',
    status: 'draft',
    recipes: AUREL.slice(0, 3),
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 1,
    deadlineDays: 30,
    instructions: 'Listen to both recordings as often as you like, then choose the one you prefer.',
    players: [],
    progress: [],
  },
  {
    name: 'Aurel A damping treatments: brightness, response, warmth',
    purpose: 'Profile the four damping treatments on the default attributes.',
    format: 'rating',
    status: 'open',
    recipes: AUREL,
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 2,
    deadlineDays: 12,
    instructions: 'Use headphones in a quiet room. Rate each recording on every scale.',
    players: [...VIOLINISTS, ...MORE_VIOLINISTS],
    progress: ['all', 6, 2, 0],
  },
  {
    name: 'Tessel D: can players hear round against flat winding?',
    purpose: 'A triangle test before any preference work on the cello D.',
    format: 'triangle',
    status: 'closed',
    recipes: ['Tessel D round', 'Tessel D flat'],
    sets: [
      ['scale', 'PF-01', 'VC-1'],
      ['phrase', 'PF-02', 'VC-1'],
    ],
    duplicates: 1,
    deadlineDays: -5,
    instructions: 'Two of the three recordings are of the same string. Pick the one that differs.',
    players: CELLISTS,
    progress: ['all', 'all', 'all', 'all'],
  },
  {
    name: 'Aurel A on your own violin',
    purpose: 'How the damping treatments play in, followed over the first weeks.',
    format: 'playtest',
    status: 'closed',
    recipes: ['Aurel A bare', 'Aurel A heavy compound', 'Aurel A fibre wrap'],
    sets: [],
    duplicates: 0,
    deadlineDays: -10,
    instructions:
      'Fit each coded set in the order on your sheet, play it for two days, then rate it.',
    players: VIOLINISTS,
    progress: ['all', 'all', 'all', 'all'],
    label: 'day 0',
  },
  {
    name: 'Aurel A on your own violin',
    purpose: 'How the damping treatments play in, followed over the first weeks.',
    format: 'playtest',
    status: 'open',
    recipes: ['Aurel A bare', 'Aurel A heavy compound', 'Aurel A fibre wrap'],
    sets: [],
    duplicates: 0,
    deadlineDays: 20,
    instructions:
      'Fit each coded set in the order on your sheet, play it for two days, then rate it.',
    players: VIOLINISTS,
    progress: [1],
    label: 'week 2',
    parent: 'day 0',
  },
  {
    name: 'Aurel A damping treatments: first listening round',
    purpose: 'Does damping darken the A string, and does it cost warmth?',
    format: 'rating',
    status: 'closed',
    recipes: AUREL,
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 2,
    deadlineDays: -20,
    instructions: 'Use headphones in a quiet room. Rate each recording on every scale.',
    players: LISTENING_PANEL,
    progress: LISTENING_PANEL.map(() => 'all'),
    profiled: true,
    randomPlayer: 6,
  },
  {
    name: 'Aurel A compound weight: preference round one',
    purpose: 'Which damping level do players prefer on the A string, and which sounds brighter?',
    format: 'pair',
    status: 'closed',
    recipes: AUREL.slice(0, 3),
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 1,
    deadlineDays: -30,
    instructions: 'Listen to both recordings as often as you like, then choose the one you prefer.',
    players: LISTENING_PANEL.slice(0, 10),
    progress: LISTENING_PANEL.slice(0, 10).map(() => 'all'),
  },
]

/**
 * Panel means the closed listening round is built around, by recipe order (bare, light
 * compound, heavy compound, fibre wrap): brightness falls with damping, bow response rises,
 * warmth does not move.
 */
const DAMPING_PROFILE: Record<string, number[]> = {
  brightness: [78, 60, 40, 58],
  bow_response: [42, 52, 66, 55],
  warmth: [55, 55, 55, 55],
}
/** Invented preference strengths (Bradley–Terry log abilities) for the pair round. */
const PREFERENCE_STRENGTH = [0, 1.4, -0.6]

async function recipeId(knex: Knex, name: string): Promise<number | null> {
  const row: { id: number } | undefined = await knex('recipes')
    .where({ name })
    .orderBy('version', 'desc')
    .first('id')
  return row?.id ?? null
}

async function clipSet(
  knex: Knex,
  recipeIds: number[],
  [excerpt, performer, instrument]: string[],
) {
  const rows: { id: number; recipe_id: number }[] = await knex('clips as c')
    .join('excerpts as e', 'e.id', 'c.excerpt_id')
    .where({ 'e.name': excerpt, 'c.performer_code': performer, 'c.instrument_code': instrument })
    .whereIn('c.recipe_id', recipeIds)
    .orderBy('c.id')
    .select('c.id', 'c.recipe_id')
  const clipIds = recipeIds.map((r) => rows.find((c) => c.recipe_id === r)?.id)
  if (clipIds.some((id) => id === undefined)) return null
  return { key: `${excerpt} · ${performer} · ${instrument}`, clipIds: clipIds as number[] }
}

interface AnswerContext {
  recipeRank: Map<number, number>
  playerIndex: number
  trialIndex: number
  demo: DemoSession
}

const clampScale = (x: number) => Math.max(0, Math.min(100, Math.round(x)))
/** A draw fixed by its key alone, so the story holds whatever order the session seed deals. */
const keyed = (...parts: (string | number)[]) => createRandom(parts.join('/')).next()

function ratedValues(t: PlannedTrial, c: AnswerContext): Record<string, number> {
  const recipe = Number(
    t.kind === 'rating' ? t.clip.recipeId : t.kind === 'playtest' ? t.recipeId : 0,
  )
  const rank = c.recipeRank.get(recipe) ?? 0
  const values: Record<string, number> = {}
  if (!c.demo.profiled) {
    const lean = rank * 12
    values.brightness = clampScale(75 - lean + random.next() * 20)
    values.bow_response = clampScale(40 + lean + random.next() * 20)
    values.warmth = clampScale(45 + lean / 2 + random.next() * 20)
    return values
  }
  const set = t.kind === 'rating' ? t.excerptKey : ''
  const p = c.playerIndex
  for (const [key, means] of Object.entries(DAMPING_PROFILE)) {
    if (p === c.demo.randomPlayer) {
      values[key] = erratic(p, c.trialIndex, t.repeatOf, key, means[rank])
      continue
    }
    // Each player sits a little higher or lower on the scale; within a player, a rating
    // scatters a few points, and a hidden repeat lands within a few points of the first.
    const offset = (keyed('offset', p, key) - 0.5) * 16
    const noise = (keyed('noise', p, recipe, key, set) - 0.5) * 12
    const repeat = t.repeatOf === null ? 0 : (keyed('repeat', p, c.trialIndex, key) - 0.5) * 8
    values[key] = clampScale(means[rank] + offset + noise + repeat)
  }
  return values
}

/**
 * A player who rates all over the scale: wide scatter around the panel, and every hidden
 * repeat at least 25 points away from its first rating, so the reliability rule must flag them.
 */
function erratic(
  p: number,
  trialIndex: number,
  repeatOf: number | null,
  key: string,
  mean: number,
): number {
  const first = (k: number) => clampScale(mean + (keyed('erratic', p, k, key) - 0.5) * 70)
  if (repeatOf === null) return first(trialIndex)
  const base = first(repeatOf)
  const jump = 25 + keyed('erratic/jump', p, trialIndex, key) * 20
  return clampScale(base >= 50 ? base - jump : base + jump)
}

/** An invented answer in the players' own format, leaning the way the recipes were made. */
function demoAnswer(t: PlannedTrial, c: AnswerContext): TrialAnswer {
  switch (t.kind) {
    case 'rating':
      return { kind: 'rating', values: ratedValues(t, c) }
    case 'playtest':
      return { kind: 'playtest', values: ratedValues(t, c), comment: '' }
    case 'pair': {
      const rank = (clip: BlindClip) => c.recipeRank.get(Number(clip.recipeId)) ?? 0
      const strength = (clip: BlindClip) => PREFERENCE_STRENGTH[rank(clip)] ?? 0
      const aWins = random.next() < 1 / (1 + Math.exp(strength(t.b) - strength(t.a)))
      // Less damping (a lower rank) sounds brighter; more damping answers the bow sooner.
      const [lighter, heavier] = rank(t.a) < rank(t.b) ? [t.a, t.b] : [t.b, t.a]
      const pick = (chance: number, likely: BlindClip, other: BlindClip) =>
        (random.next() < chance ? likely : other).code
      return {
        kind: 'pair',
        preferred: (aWins ? t.a : t.b).code,
        more: {
          brightness: pick(0.85, lighter, heavier),
          bow_response: pick(0.75, heavier, lighter),
          warmth: pick(0.5, lighter, heavier),
        },
      }
    }
    case 'triangle': {
      // The last cellist never hears it; the others always do.
      const hears = c.playerIndex !== 3
      const chosen = hears ? t.odd : (t.odd + 1) % 3
      return { kind: 'triangle', odd: t.samples[chosen].code }
    }
  }
}

export async function seedDemoSessions(ctx: AppContext): Promise<number> {
  const { knex } = ctx
  if (await knex('sessions').first('id')) return 0
  const now = ctx.clock.now()
  const day = (d: number) => new Date(now.getTime() + d * DAY).toISOString()
  const developer: { id: number } | undefined = await knex('users')
    .where({ email: DEMO_STAFF[1].email })
    .first('id')
  const created = new Map<string, number>()
  let count = 0
  for (const demo of SESSIONS) {
    const recipeIds = (await Promise.all(demo.recipes.map((r) => recipeId(knex, r)))).filter(
      (id): id is number => id !== null,
    )
    if (recipeIds.length !== demo.recipes.length) continue
    const sets = await Promise.all(demo.sets.map((s) => clipSet(knex, recipeIds, s)))
    if (sets.some((s) => s === null)) continue
    const openedDay = Math.min(demo.deadlineDays - 14, -1)
    await knex.transaction(async (trx) => {
      const [id] = await trx('sessions').insert({
        name: demo.name,
        purpose: demo.purpose,
        format: demo.format,
        status: demo.status,
        seed: newSeed(),
        recipe_ids: JSON.stringify(recipeIds),
        clip_sets: JSON.stringify(sets),
        attributes: JSON.stringify(DEFAULT_ATTRIBUTES),
        duplicates: demo.duplicates,
        allow_no_preference: false,
        instructions: demo.instructions,
        deadline: day(demo.deadlineDays).slice(0, 10),
        reminder_days_before: 2,
        parent_session_id: demo.parent ? (created.get(demo.parent) ?? null) : null,
        time_point_label: demo.label ?? null,
        created_by: developer?.id ?? null,
        created_at: day(openedDay - 2),
        updated_at: day(openedDay),
        opened_at: demo.status === 'draft' ? null : day(openedDay),
        closed_at: demo.status === 'closed' ? day(demo.deadlineDays + 1) : null,
      })
      if (demo.label) created.set(demo.label, id as number)
      await invitePlayers(ctx, trx, id as number, demo, recipeIds, day(openedDay))
    })
    count++
  }
  return count
}

async function invitePlayers(
  ctx: AppContext,
  trx: Knex,
  sessionId: number,
  demo: DemoSession,
  recipeIds: number[],
  invitedAt: string,
) {
  const session = await loadSession(trx, sessionId)
  const input = await sessionInput(trx, session)
  const recipeRank = new Map(recipeIds.map((id, i) => [id, i]))
  for (const [index, local] of demo.players.entries()) {
    const player: { id: number; code: string; name: string; email: string } | undefined = await trx(
      'players',
    )
      .where({ email: `${local}@players.larchmere.test`, status: 'active' })
      .first('id', 'code', 'name', 'email')
    if (!player) continue
    const plan = buildPlayerPlan(input, index)
    const given = demo.progress[index] ?? 0
    const answers = given === 'all' ? plan.trials.length : given
    const at = (k: number) => new Date(Date.parse(invitedAt) + (k + 1) * 3_600_000).toISOString()
    const [invId] = await trx('invitations').insert({
      session_id: sessionId,
      player_id: player.id,
      player_index: index,
      token_id: randomUUID(),
      invited_at: invitedAt,
      last_sent_at: invitedAt,
      opened_at: index < demo.progress.length ? at(0) : null,
      started_at: answers > 0 ? at(1) : null,
      completed_at: answers === plan.trials.length ? at(answers + 1) : null,
    })
    await fixServedPlans(
      trx,
      session,
      [{ id: invId as number, player_index: index }],
      new Date(invitedAt),
    )
    for (const [k, t] of plan.trials.slice(0, answers).entries())
      await trx('answers').insert({
        invitation_id: invId,
        trial_index: k,
        // Checked against the players' answer format and stored as the answer service stores
        // a player's own answer, so resuming and findings read it back alike.
        payload: JSON.stringify(
          storedAnswer(
            t,
            trialAnswer.parse(
              demoAnswer(t, { recipeRank, playerIndex: index, trialIndex: k, demo }),
            ),
          ),
        ),
        answered_at: at(k + 1),
      })
    if (session.status === 'open') {
      const inv = await loadInvitation(trx, invId as number)
      const progress = { answered: answers, trialCount: plan.trials.length }
      await queueInvitationMail(ctx, trx, 'invitation', inv, session, player, progress)
    }
  }
}
