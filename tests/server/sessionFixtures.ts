import { opaqueName } from '../../server/clips/storage'
import type { Knex } from 'knex'
import type { Agent } from './helpers'
import type { PlannedTrial } from '../../server/design/index.ts'
import type { GivenAnswer } from '../../server/formats/index.ts'
import { storedAnswer } from '../../server/answers/stored'

// Sessions only refer to clips by id, so these tests store clip rows without audio files.

let counter = 0
const unique = () => `${Date.now().toString(36)}-${++counter}`

export async function addRecipe(knex: Knex, name: string): Promise<number> {
  const now = new Date().toISOString()
  const [id] = await knex('recipes').insert({
    name: `${name} ${unique()}`,
    instrument: 'violin',
    string_name: 'A',
    core: 'synthetic multifilament',
    vibrating_length_mm: 328,
    status: 'prototype',
    created_at: now,
    updated_at: now,
  })
  return id as number
}

export async function addClip(
  knex: Knex,
  recipeId: number,
  set: { excerpt?: string; performer?: string; instrument?: string } = {},
): Promise<number> {
  const excerpt: { id: number } = await knex('excerpts')
    .where({ name: set.excerpt ?? 'scale' })
    .first('id')
  const now = new Date().toISOString()
  const file = unique()
  const [id] = await knex('clips').insert({
    recipe_id: recipeId,
    excerpt_id: excerpt.id,
    performer_code: set.performer ?? 'PF-T1',
    instrument_code: set.instrument ?? 'VN-T1',
    kind: 'bowed',
    original_name: `take-${file}.wav`,
    // Names as intake gives them: anything else is a stored row the media routes refuse.
    original_file: opaqueName('wav'),
    rendition_file: opaqueName('wav'),
    rendition_gain_db: 0,
    container: 'wav',
    duration_s: 3,
    sample_rate: 48000,
    channels: 1,
    bit_depth: 16,
    peak_dbfs: -6,
    loudness_lufs: -23,
    created_at: now,
    updated_at: now,
  })
  return id as number
}

/** Recipes with one clip each in `sets` matched sets (distinct performers). */
export async function studyFixture(knex: Knex, recipes = 3, sets = 2, prefix = 'Fixture') {
  const recipeIds: number[] = []
  for (let r = 0; r < recipes; r++) recipeIds.push(await addRecipe(knex, `${prefix} ${r + 1}`))
  const clipSets: { key: string; clipIds: number[] }[] = []
  const performerTag = unique()
  for (let s = 0; s < sets; s++) {
    const performer = `PF-${performerTag}-${s}`
    const clipIds: number[] = []
    for (const id of recipeIds) clipIds.push(await addClip(knex, id, { performer }))
    clipSets.push({ key: `scale · ${performer}`, clipIds })
  }
  return { recipeIds, clipSets }
}

export function isoDay(d: Date, plusDays = 0): string {
  return new Date(d.getTime() + plusDays * 86_400_000).toISOString().slice(0, 10)
}

export async function addPlayers(
  knex: Knex,
  n: number,
  extra: { instruments?: string[]; level?: string; region?: string } = {},
): Promise<number[]> {
  const ids: number[] = []
  const now = new Date().toISOString()
  for (let i = 0; i < n; i++) {
    const tag = unique()
    const [id] = await knex('players').insert({
      code: `P-T${tag}`.slice(0, 16),
      name: `Testplayer ${tag} Example`,
      email: `player.${tag}@example.test`,
      instruments: JSON.stringify(extra.instruments ?? ['violin']),
      level: extra.level ?? 'professional',
      region: extra.region ?? 'North',
      status: 'active',
      created_at: now,
      updated_at: now,
    })
    ids.push(id as number)
  }
  return ids
}

/**
 * Creates and opens a session through the API; returns its id. A body without a player title
 * gets a neutral one, as every session needs one. Fixture sets hold one take of each recipe,
 * so opening accepts the single-take warning unless told not to.
 */
export async function openStudy(
  agent: Agent,
  body: Record<string, unknown>,
  open: { acceptSameTake?: boolean } = { acceptSameTake: true },
): Promise<{ id: number; session: Record<string, unknown> }> {
  const created = await agent
    .post('/api/sessions')
    .send({ playerTitle: 'Listening session', ...body })
  if (created.status !== 201)
    throw new Error(`create: ${created.status} ${JSON.stringify(created.body)}`)
  const opened = await agent.post(`/api/sessions/${created.body.session.id}/open`).send(open)
  if (opened.status !== 200)
    throw new Error(`open: ${opened.status} ${JSON.stringify(opened.body)}`)
  return { id: created.body.session.id, session: opened.body.session }
}

/** A valid blind answer to a served trial: the first code, or 50 on the first attribute. */
function sampleAnswer(trial: PlannedTrial): GivenAnswer {
  switch (trial.kind) {
    case 'rating':
      return { kind: 'rating', values: { brightness: 50 } }
    case 'playtest':
      return { kind: 'playtest', values: { brightness: 50 }, comment: '' }
    case 'pair':
      return { kind: 'pair', preferred: trial.a.code, more: {} }
    case 'triangle':
      return { kind: 'triangle', odd: trial.samples[0].code }
  }
}

/**
 * Stores answers to the invitation's served trials as the answer service does, without going
 * through the player's steps, so locks and progress can be tested on their own.
 */
export async function addAnswers(knex: Knex, invitationId: number, trials: number[], at: string) {
  const row: { trials: string } = await knex('served_plans')
    .where({ invitation_id: invitationId })
    .first('trials')
  const served = (JSON.parse(row.trials) as { trials: PlannedTrial[] }).trials
  for (const trial of trials)
    await knex('answers').insert({
      invitation_id: invitationId,
      trial_index: trial,
      payload: JSON.stringify(storedAnswer(served[trial], sampleAnswer(served[trial]))),
      answered_at: at,
    })
}
