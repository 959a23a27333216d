import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { parse as parseCsv } from 'csv-parse/sync'
import { fixedClock } from '../../server/clock'
import type { PlannedTrial } from '../../server/design/index.ts'
import { planFor, sessionInput } from '../../server/sessions/plans'
import { loadSession } from '../../server/sessions/rows'
import { FINDINGS_TABLES } from '../../shared/schemas/findings'
import type { TrialAnswer } from '../../shared/schemas/rating'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { isoDay } from './sessionFixtures'

/*
 * Every CSV export, byte for byte, over small answered sessions of each format. The recorded
 * files under __snapshots__/exports are the exports as they were when this guard was written:
 * a change to any byte of an export (a column, its order, quoting, number formatting, line
 * ends) shows up here and has to be recorded on purpose with `vitest -u`.
 *
 * Everything that reaches a CSV is fixed: names and codes are spelled out, seeds are set
 * before a session opens, the clock stands still, and ids follow from a fresh database.
 */

const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
const STAMP = clock.now().toISOString()
let t: TestApp
let developer: Agent
let analyst: Agent

beforeAll(async () => {
  t = await buildApp({ clock })
  developer = await signInAs(t.app, 'developer')
  analyst = await signInAs(t.app, 'analyst')
})
afterAll(() => t.close())

let fileCounter = 0

async function recipe(name: string): Promise<number> {
  const [id] = await t.knex('recipes').insert({
    name,
    instrument: 'violin',
    string_name: 'A',
    core: 'synthetic multifilament',
    vibrating_length_mm: 328,
    status: 'prototype',
    created_at: STAMP,
    updated_at: STAMP,
  })
  return id as number
}

/** A clip row with measures of its own, so objective-vs-perceived has something to correlate. */
async function clip(recipeId: number, performer: string, k: number): Promise<number> {
  const excerpt: { id: number } = await t.knex('excerpts').where({ name: 'scale' }).first('id')
  const file = `export-${++fileCounter}`
  const [id] = await t.knex('clips').insert({
    recipe_id: recipeId,
    excerpt_id: excerpt.id,
    performer_code: performer,
    instrument_code: 'VN-X1',
    kind: 'bowed',
    original_name: `take-${file}.wav`,
    original_file: `o-${file}.wav`,
    rendition_file: `r-${file}.wav`,
    rendition_gain_db: 0,
    container: 'wav',
    duration_s: 3,
    sample_rate: 48000,
    channels: 1,
    bit_depth: 16,
    peak_dbfs: -6,
    loudness_lufs: -23 + ((k * 5) % 7) * 0.25,
    centroid_hz: 1800 + ((k * 3) % 5) * 110,
    t60_s: 0.4 + ((k * 2) % 3) * 0.05,
    attack_s: 0.02 + (k % 4) * 0.004,
    created_at: STAMP,
    updated_at: STAMP,
  })
  return id as number
}

/** One clip per recipe for each performer: the matched sets of a listening session. */
async function clipSets(recipeIds: number[], performers: string[]) {
  const sets: { key: string; clipIds: number[] }[] = []
  for (const performer of performers) {
    const clipIds: number[] = []
    for (const id of recipeIds) clipIds.push(await clip(id, performer, fileCounter))
    sets.push({ key: `scale · ${performer}`, clipIds })
  }
  return sets
}

async function players(
  codes: string[],
  extra: { instruments?: string[]; level?: string } = {},
): Promise<number[]> {
  const ids: number[] = []
  for (const code of codes) {
    const [id] = await t.knex('players').insert({
      code,
      name: `Player ${code} Example`,
      email: `${code.toLowerCase()}@example.test`,
      instruments: JSON.stringify(extra.instruments ?? ['violin']),
      level: extra.level ?? 'professional',
      region: 'North',
      status: 'active',
      created_at: STAMP,
      updated_at: STAMP,
    })
    ids.push(id as number)
  }
  return ids
}

/** Opens a draft under a fixed seed, so blind codes and orders are the same on every run. */
async function openWithSeed(id: number, seed: string) {
  await t.knex('sessions').where({ id }).update({ seed })
  const opened = await developer.post(`/api/sessions/${id}/open`).send({ acceptSameTake: true })
  if (opened.status !== 200)
    throw new Error(`open: ${opened.status} ${JSON.stringify(opened.body)}`)
}

async function createSession(body: Record<string, unknown>, seed: string): Promise<number> {
  const created = await developer
    .post('/api/sessions')
    .send({ playerTitle: 'Listening for the export', ...body })
  if (created.status !== 201)
    throw new Error(`create: ${created.status} ${JSON.stringify(created.body)}`)
  const id = created.body.session.id as number
  await openWithSeed(id, seed)
  return id
}

async function invite(sessionId: number, playerIds: number[]) {
  const res = await developer.post(`/api/sessions/${sessionId}/invitations`).send({ playerIds })
  if (res.status !== 200) throw new Error(`invite: ${res.status} ${JSON.stringify(res.body)}`)
}

type Answerer = (trial: PlannedTrial, player: number, trialIndex: number) => TrialAnswer | null

/** Stores an answer for every trial `answer` does not skip, as the player pages would. */
async function answerAll(sessionId: number, answer: Answerer) {
  const input = await sessionInput(t.knex, await loadSession(t.knex, sessionId))
  const invitations: { id: number; player_index: number }[] = await t
    .knex('invitations')
    .where({ session_id: sessionId })
    .orderBy('player_index')
    .select('id', 'player_index')
  for (const inv of invitations) {
    const plan = planFor(input, inv.player_index)
    for (const [k, trial] of plan.trials.entries()) {
      const given = answer(trial, inv.player_index, k)
      if (!given) continue
      const payload = inv.player_index % 2 === 0 ? given : { given }
      await t.knex('answers').insert({
        invitation_id: inv.id,
        trial_index: k,
        payload: JSON.stringify(payload),
        answered_at: new Date(
          clock.now().getTime() + (inv.player_index * 100 + k) * 60_000,
        ).toISOString(),
      })
    }
  }
}

interface Exported {
  name: string
  path: string
}

/** The answers export and every table export of a session, under `prefix-<table>.csv`. */
const allExports = (prefix: string, id: number, query = ''): Exported[] => [
  { name: `${prefix}-answers`, path: `/api/findings/${id}/export/answers.csv${query}` },
  ...FINDINGS_TABLES.map((table) => ({
    name: `${prefix}-${table}`,
    path: `/api/findings/${id}/export/${table}.csv${query}`,
  })),
]

const exports: Exported[] = []

beforeAll(async () => {
  // Names that need quoting or would start a spreadsheet formula, beside a plain one.
  const a = await recipe('Export A plain')
  const b = await recipe('Export A "soft", wound')
  const c = await recipe('-Export A heavy')
  const d = await recipe('Export A fibre')
  const violins = await players(['EX-V01', 'EX-V02', 'EX-V03', 'EX-V04'])
  const violas = await players(['EX-A01', 'EX-A02'], { instruments: ['viola'], level: 'student' })
  const panel = [...violins, ...violas]

  // Attribute ratings with hidden repeats, an excluded player and a later time point.
  const ratingSets = await clipSets([a, b, c], ['PF-X1', 'PF-X2'])
  const rating = await createSession(
    {
      name: 'Export rating',
      format: 'rating',
      recipeIds: [a, b, c],
      clipSets: ratingSets,
      duplicates: 2,
      timePointLabel: 'day 0',
      deadline: isoDay(clock.now(), 14),
    },
    'export-rating-0',
  )
  await invite(rating, panel)
  const rated =
    (shift: number): Answerer =>
    (trial, player, k) => {
      if (trial.kind !== 'rating') throw new Error('rating trials only')
      const rank = [a, b, c].indexOf(Number(trial.clip.recipeId))
      const wobble = ((player * 7 + rank * 3 + k) % 9) - 4
      // The last player leaves some trials open, so counts differ between cells.
      if (player === 5 && k % 4 === 3) return null
      return {
        kind: 'rating',
        values: {
          brightness: 80 - rank * 15 + wobble + (rank === 0 ? shift : 0),
          warmth: 50 + wobble * 2 + (player === 2 ? k * 3 : 0),
          bow_response: 60,
        },
      }
    }
  await answerAll(rating, rated(0))
  const codes: { code: string }[] = await t
    .knex('players')
    .whereIn('id', panel)
    .orderBy('id')
    .select('code')
  const excluded = await analyst
    .post(`/api/findings/${rating}/exclusions`)
    .send({ playerCode: codes[3].code, reason: 'Played with a mute on, by mistake' })
  expect(excluded.status).toBe(200)
  const later = await developer
    .post(`/api/sessions/${rating}/time-points`)
    .send({ label: 'week 2', deadline: isoDay(clock.now(), 28) })
  expect(later.status).toBe(201)
  const week2 = later.body.session.id as number
  await openWithSeed(week2, 'export-rating-1')
  await invite(week2, panel)
  await answerAll(week2, rated(6))
  exports.push(...allExports('rating', rating), ...allExports('rating-week2', week2))
  exports.push(...allExports('rating-violas', rating, '?instrument=viola'))

  // Pair preferences with "no preference" allowed and a split panel, so the scale is finite.
  const pair = await createSession(
    {
      name: 'Export pair',
      format: 'pair',
      recipeIds: [a, b, c],
      clipSets: await clipSets([a, b, c], ['PF-X3']),
      allowNoPreference: true,
      deadline: isoDay(clock.now(), 14),
    },
    'export-pair-0',
  )
  await invite(pair, panel)
  await answerAll(pair, (trial, player, k) => {
    if (trial.kind !== 'pair') throw new Error('pair trials only')
    const [low, high] =
      Number(trial.a.clipId) < Number(trial.b.clipId) ? [trial.a, trial.b] : [trial.b, trial.a]
    const turn = (player + k) % 4
    return {
      kind: 'pair',
      preferred: turn === 3 ? null : (turn === 2 ? high : low).code,
      more: { brightness: (player % 3 === 0 ? high : low).code, warmth: trial.a.code },
    }
  })
  exports.push(...allExports('pair', pair))

  // Odd one out, with a repeat that the triangle count sets aside.
  const triangle = await createSession(
    {
      name: 'Export triangle',
      format: 'triangle',
      recipeIds: [a, d],
      clipSets: await clipSets([a, d], ['PF-X4', 'PF-X5']),
      duplicates: 1,
      deadline: isoDay(clock.now(), 14),
    },
    'export-triangle-0',
  )
  await invite(triangle, panel)
  await answerAll(triangle, (trial, player) => {
    if (trial.kind !== 'triangle') throw new Error('triangle trials only')
    const pick = player < 4 ? trial.odd : (trial.odd + 1) % 3
    return { kind: 'triangle', odd: trial.samples[pick].code }
  })
  exports.push(...allExports('triangle', triangle))

  // A play-test, whose comments need quoting, escaping and the formula guard.
  const playtest = await createSession(
    {
      name: 'Export play-test',
      format: 'playtest',
      recipeIds: [a, b, c],
      duplicates: 1,
      deadline: isoDay(clock.now(), 21),
    },
    'export-playtest-0',
  )
  await invite(playtest, violins)
  const comments = ['Quick to speak, "clean" start', '=ROUND(1)', 'two\nlines', '', '+ warm']
  await answerAll(playtest, (trial, player, k) => {
    if (trial.kind !== 'playtest') throw new Error('play-test trials only')
    const rank = [a, b, c].indexOf(Number(trial.recipeId))
    return {
      kind: 'playtest',
      values: { brightness: 30 + rank * 20 + ((player + k) % 5), warmth: 55 - player * 3 + k },
      comment: comments[(player + k) % comments.length],
    }
  })
  exports.push(...allExports('playtest', playtest))
})

describe('CSV exports', () => {
  it('are RFC 4180 records: CRLF line ends and the same number of fields in every row', async () => {
    for (const e of exports) {
      const res = await analyst.get(e.path)
      expect(res.status, e.name).toBe(200)
      // RFC 4180 §2: each record ends with CRLF, the last one included.
      expect(res.text.endsWith('\r\n'), e.name).toBe(true)
      // RFC 4180 §2: a header line, then records with the same number of fields; csv-parse
      // throws on a record of another length.
      const rows = parseCsv(res.text, { relax_column_count: false }) as string[][]
      expect(rows.length, e.name).toBeGreaterThanOrEqual(1)
    }
  })

  it('keep their bytes', async () => {
    for (const e of exports) {
      const res = await analyst.get(e.path)
      expect(res.status, e.name).toBe(200)
      await expect(res.text, e.name).toMatchFileSnapshot(`./__snapshots__/exports/${e.name}.csv`)
    }
  })
})
