import { mkdirSync, writeFileSync } from 'node:fs'
import { randomBytes } from 'node:crypto'
import type { Knex } from 'knex'
import request from 'supertest'
import { encodeWav, synth } from '../../server/audio/index.ts'
import { mediaFolders } from '../../server/clips/storage'
import { signInvitation } from '../../server/auth/invitationTokens'
import type { TestApp } from './helpers'
import type { PlayerState } from '../../shared/schemas/rating'

// Sessions for the player's path: clips with real rendition files, and invitation tokens
// signed the way the mail signs them.

/** Gives fixture clips a playable rendition under an opaque name and a long waveform. */
export async function giveAudio(knex: Knex, mediaDir: string, clipIds: number[]) {
  const folder = mediaFolders(mediaDir).renditions
  mkdirSync(folder, { recursive: true })
  for (const [i, id] of clipIds.entries()) {
    const samples = synth.bowedTone({
      f0: 330 + 20 * i,
      seconds: 0.5 + 0.05 * i,
      attackSeconds: 0.02,
      peakDbfs: -12,
    })
    const name = `${randomBytes(16).toString('hex')}.wav`
    writeFileSync(`${folder}/${name}`, encodeWav([samples], 48_000, { bitDepth: 16 }))
    const peaks = Array.from({ length: 1500 }, (_, k) => Math.sin(k / 40) * 0.5)
    await knex('clips')
      .where({ id })
      .update({
        rendition_file: name,
        duration_s: samples.length / 48_000,
        peaks: JSON.stringify({ min: peaks.map((p) => -Math.abs(p)), max: peaks.map(Math.abs) }),
      })
  }
}

export interface Invited {
  id: number
  token: string
}

/** Every invitation of a session with a working link, in invitation order. */
export async function invitedOf(t: TestApp, sessionId: number): Promise<Invited[]> {
  const session: { deadline: string } = await t
    .knex('sessions')
    .where({ id: sessionId })
    .first('deadline')
  const rows: { id: number; token_id: string | null }[] = await t
    .knex('invitations')
    .where({ session_id: sessionId })
    .orderBy('player_index')
    .select('id', 'token_id')
  return rows.map((r) => ({
    id: r.id,
    token: signInvitation(
      t.config.jwtSecret,
      t.app.locals.ctx.clock,
      { jti: r.token_id ?? 'revoked', sub: r.id },
      session.deadline,
    ),
  }))
}

interface PlanTrial {
  index: number
  kind: 'rating' | 'pair' | 'triangle' | 'playtest'
  clips: { code: number }[]
}

/** A fitting answer for any trial, with values shifted by `lean` to tell answers apart. */
export function answerFor(trial: PlanTrial, attributeKeys: string[], lean = 0) {
  const values = Object.fromEntries(attributeKeys.map((k, i) => [k, (40 + 10 * i + lean) % 101]))
  switch (trial.kind) {
    case 'rating':
      return { kind: 'rating', values }
    case 'playtest':
      return { kind: 'playtest', values, comment: 'Settled after a day.' }
    case 'pair':
      return {
        kind: 'pair',
        preferred: trial.clips[lean % 2].code,
        more: Object.fromEntries(attributeKeys.map((k, i) => [k, trial.clips[i % 2].code])),
      }
    case 'triangle':
      return { kind: 'triangle', odd: trial.clips[lean % 3].code }
  }
}

interface Deal {
  attempt: number
  trials: { tones: string[] }[]
}

/** Picks for a dealt headphone check: the quiet tone of each set, the first `wrong` missed. */
export function headphonePicks(deal: Partial<Deal>, wrong = 0): number[] {
  return (deal.trials ?? []).map((t, i) => {
    const right = t.tones.indexOf('quiet')
    return i < wrong ? (right + 1) % 3 : right
  })
}

/** Takes one attempt at the headphone check as the page does: deal, then picks. */
export async function takeHeadphoneCheck(t: TestApp, token: string, wrong = 0) {
  const dealt = await request(t.app).post('/api/player/headphone/start').send({ token })
  if (dealt.status !== 200) return dealt
  const deal = dealt.body as Deal
  return request(t.app)
    .post('/api/player/headphone')
    .send({ token, attempt: deal.attempt, responses: headphonePicks(deal, wrong) })
}

/**
 * Passes the headphone check at the first attempt, as a player who hears it: in a listening
 * session the level step and the answers wait for it. `app` is the app or a server's address.
 */
export async function passHeadphoneCheck(app: Parameters<typeof request>[0], token: string) {
  const dealt = await request(app).post('/api/player/headphone/start').send({ token })
  if (dealt.status !== 200)
    throw new Error(`the headphone check was not dealt: ${dealt.status} ${dealt.text}`)
  const deal = dealt.body as Deal
  const passed = await request(app)
    .post('/api/player/headphone')
    .send({ token, attempt: deal.attempt, responses: headphonePicks(deal) })
  if (passed.status !== 200 || passed.body.headphone?.status !== 'passed')
    throw new Error(`the headphone check did not pass: ${passed.status} ${passed.text}`)
  return passed.body as PlayerState
}
