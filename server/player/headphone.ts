/*
 * The headphone check, dealt and scored here so that the player's browser never reports its
 * own score: each attempt's tone orders are drawn and stored by the server, the browser plays
 * them and sends back which tone the player picked, and the server counts the right picks and
 * applies the pass mark. A failed check may be taken once more after a pause; a second failure
 * lets the player go on, and the invitation stands flagged (findings leave it out by default).
 * Until the check is finished the level step and the answers wait (headphoneGate.ts).
 *
 * The browser makes the sound, so what it is dealt necessarily says which tone is the quiet
 * one: this stops a made-up score, not a rewritten page. The deal is about tones only and says
 * nothing about the session's recordings.
 */
import { randomInt } from 'node:crypto'
import type { AppContext } from '../context'
import { conflict, validationFailed } from '../errors'
import { assertConsent, assertStillOpen, openForAnswers, type PlayerAccess } from './access'
import { stateOf } from './progress'
import {
  checkRows,
  dealtTones,
  hasHeadphoneCheck,
  isScored,
  recordOf,
  retryAllowedAt,
} from './headphoneRecord'
import {
  HEADPHONE_RETRY,
  headphonePassed,
  headphoneTrials,
  type HeadphoneDeal,
} from '../../shared/headphoneCheck'
import type { PlayerState } from '../../shared/schemas/rating'

/** Unpredictable, unlike Math.random: the next deal cannot be worked out from the last. */
const secureRandom = () => randomInt(0, 2 ** 32) / 2 ** 32

const times = (n: number) => ['never', 'once', 'twice'][n] ?? `${n} times`
const noMoreAttempts = () =>
  conflict(
    `The headphone check can be taken ${times(HEADPHONE_RETRY.attempts)} at most. You can go on to the trials.`,
  )

async function checkedAccess(ctx: AppContext, token: string): Promise<PlayerAccess> {
  const access = await openForAnswers(ctx, token)
  assertConsent(access.inv)
  if (!hasHeadphoneCheck(access.session.format))
    throw conflict('This session has no headphone check: its strings are played, not listened to')
  return access
}

/** Deals the next attempt, or gives back the one dealt and not yet answered (a reload). */
export async function startHeadphoneCheck(ctx: AppContext, token: string): Promise<HeadphoneDeal> {
  const access = await checkedAccess(ctx, token)
  const now = ctx.clock.now()
  return ctx.knex.transaction(async (trx) => {
    await assertStillOpen(trx, access, now)
    const record = recordOf(await checkRows(trx, access.inv.id))
    if (record.status === 'passed') throw conflict('The headphone check is already passed')
    if (record.pending)
      return {
        attempt: record.pending.attempt,
        trials: dealtTones(record.pending).map((tones) => ({ tones })),
      }
    if (record.status === 'failed') throw noMoreAttempts()
    const allowedAt = retryAllowedAt(record)
    if (allowedAt && now < allowedAt) {
      const seconds = Math.ceil((allowedAt.getTime() - now.getTime()) / 1000)
      throw conflict(
        `Please wait ${seconds} more second${seconds === 1 ? '' : 's'} before trying the headphone check again.`,
      )
    }
    const attempt = record.attempts + 1
    const tones = headphoneTrials(secureRandom).map((t) => t.tones)
    await trx('headphone_checks').insert({
      invitation_id: access.inv.id,
      attempt,
      dealt: JSON.stringify(tones),
      dealt_at: now.toISOString(),
    })
    return { attempt, trials: tones.map((t) => ({ tones: t })) }
  })
}

/**
 * Scores the player's picks against what was dealt. Sending the same picks again (a retried
 * request) changes nothing; other picks for a scored attempt are refused.
 */
export async function recordHeadphoneCheck(
  ctx: AppContext,
  token: string,
  check: { attempt: number; responses: number[] },
): Promise<PlayerState> {
  const access = await checkedAccess(ctx, token)
  if (check.attempt > HEADPHONE_RETRY.attempts) throw noMoreAttempts()
  const now = ctx.clock.now()
  await ctx.knex.transaction(async (trx) => {
    await assertStillOpen(trx, access, now)
    const row = (await checkRows(trx, access.inv.id)).find((r) => r.attempt === check.attempt)
    if (!row || !row.dealt)
      throw conflict('That attempt at the headphone check was not started: start the check first')
    const responses = JSON.stringify(check.responses)
    if (isScored(row)) {
      if (row.responses === responses) return
      throw conflict('That attempt at the headphone check has already been scored')
    }
    const dealt = dealtTones(row)
    if (check.responses.length !== dealt.length)
      throw validationFailed('Answer every set of tones', {
        fields: { responses: [`Answer all ${dealt.length} sets of tones`] },
      })
    const correct = dealt.filter((tones, i) => tones.indexOf('quiet') === check.responses[i]).length
    await trx('headphone_checks')
      .where({ id: row.id })
      .update({
        responses,
        correct,
        trials: dealt.length,
        passed: headphonePassed(correct, dealt.length),
        at: now.toISOString(),
      })
  })
  return stateOf(ctx, access)
}
