import { randomUUID } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from './context'
import { DEMO_STAFF } from './demo'
import { buildPlayerPlan, createRandom, type PlannedTrial } from './design/index.ts'
import { newSeed } from './services/sessions'
import { sessionInput } from './services/playerView'
import { loadInvitation, queueInvitationMail } from './services/invitationRows'
import { loadSession } from './services/sessionRows'
import { DEFAULT_ATTRIBUTES, type SessionFormat } from '../shared/schemas/sessions'

/*
 * Demo sessions of Larchmere String Works in every state: a draft, an open rating session with
 * players part-way, a closed triangle test everybody finished, and a play-test followed over
 * time. The open sessions' invitations go through the outbox, so they can be read in the
 * Mailbox once the server has delivered them to the local mail fake.
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
}

const VIOLINISTS = ['ilse.marchetti', 'noor.halloran', 'saskia.lindqvist', 'wren.adebayo']
const MORE_VIOLINISTS = ['zelda.okonkwo', 'caspian.mbeki', 'freya.nakamura-holt', 'hana.castellane']
const CELLISTS = ['kofi.brandvold', 'tarek.villanueva', 'anselm.fairweather', 'emrys.kowalczyk']
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
]

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

/** An invented answer that leans the way the demo recipes were made to sound. */
function demoAnswer(t: PlannedTrial, recipeRank: Map<number, number>): Record<string, unknown> {
  const lean = (id: string | number) => (recipeRank.get(Number(id)) ?? 0) * 12
  const scale = (base: number) => Math.max(0, Math.min(100, Math.round(base + random.next() * 20)))
  switch (t.kind) {
    case 'rating':
    case 'playtest': {
      const id = t.kind === 'rating' ? t.clip.recipeId : t.recipeId
      return {
        ratings: {
          brightness: scale(75 - lean(id)),
          bow_response: scale(40 + lean(id)),
          warmth: scale(45 + lean(id) / 2),
        },
      }
    }
    case 'pair':
      return { preferred: random.next() < 0.5 ? 0 : 1 }
    case 'triangle':
      return { odd: random.next() < 0.7 ? t.odd : (t.odd + 1) % 3 }
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
    for (const [k, t] of plan.trials.slice(0, answers).entries())
      await trx('answers').insert({
        invitation_id: invId,
        trial_index: k,
        payload: JSON.stringify(demoAnswer(t, recipeRank)),
        answered_at: at(k + 1),
      })
    if (session.status === 'open') {
      const inv = await loadInvitation(trx, invId as number)
      const progress = { answered: answers, trialCount: plan.trials.length }
      await queueInvitationMail(ctx, trx, 'invitation', inv, session, player, progress)
    }
  }
}
