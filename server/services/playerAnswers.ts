import type { AppContext } from '../context'
import { validationFailed } from '../errors'
import { assertConsent, assertStillOpen, openForAnswers } from './playerAccess'
import { plannedTrials } from './playerPlan'
import { answerProblems, type GivenAnswer } from './answerCheck'
import { sameAnswer, storedAnswer } from './answerPayload'
import { designOf } from './sessionRows'
import type { SaveAnswerResult } from '../../shared/schemas/player'

/**
 * Saves one trial's answer. Keyed by invitation and trial: the same answer again changes
 * nothing and says so; a different one replaces the first (the player changed their mind).
 * Either way a trial is one row, so a retried or doubled request can never count twice.
 */
export async function saveAnswer(
  ctx: AppContext,
  token: string,
  trialIndex: number,
  answer: GivenAnswer,
): Promise<SaveAnswerResult> {
  const access = await openForAnswers(ctx, token)
  assertConsent(access.inv)
  const now = ctx.clock.now()
  return ctx.knex.transaction(async (trx) => {
    await assertStillOpen(trx, access, now)
    const { inv, session } = access
    const trials = await plannedTrials(trx, session, inv)
    const trial = trials[trialIndex]
    if (!trial)
      throw validationFailed('There is no such trial in your session', {
        fields: { trialIndex: [`Your session has trials 1 to ${trials.length}`] },
      })
    const problems = answerProblems(trial, answer, {
      attributeKeys: designOf(session).attributes.map((a) => a.key),
      allowNoPreference: Boolean(session.allow_no_preference),
    })
    if (Object.keys(problems).length)
      throw validationFailed('This answer does not fit the trial', { fields: problems })

    const key = { invitation_id: inv.id, trial_index: trialIndex }
    const existing: { id: number; payload: string } | undefined = await trx('answers')
      .where(key)
      .first('id', 'payload')
    const duplicate = existing !== undefined && sameAnswer(existing.payload, answer)
    if (!duplicate) {
      const row = {
        payload: JSON.stringify(storedAnswer(trial, answer)),
        answered_at: now.toISOString(),
      }
      if (existing) await trx('answers').where({ id: existing.id }).update(row)
      else await trx('answers').insert({ ...key, ...row })
    }

    const [{ n }] = (await trx('answers').where({ invitation_id: inv.id }).count({ n: '*' })) as {
      n: number
    }[]
    const answered = Number(n)
    const done = answered >= trials.length
    await trx('invitations')
      .where({ id: inv.id })
      .update({
        started_at: inv.started_at ?? now.toISOString(),
        completed_at: inv.completed_at ?? (done ? now.toISOString() : null),
      })
    return { saved: true, duplicate, answered, trialCount: trials.length, done }
  })
}
