import type { AppContext } from '../context'
import { validationFailed } from '../errors'
import {
  assertConsent,
  checkStillOpen,
  openForAnswersQuickly,
  STILL_OPEN_SQL,
  type StillOpenRow,
} from './access'
import { groupCommit } from '../db/groupCommit'
import { plannedTrials } from './plan'
import type { GivenAnswer } from '../formats/index.ts'
import { answerProblems } from '../formats/answers'
import { sameAnswer, storedAnswer } from '../answers/stored'
import { designOf } from '../sessions/rows'
import { assertHeadphoneFinished, assertStandingFinished } from './headphoneGate'
import type { SaveAnswerResult } from '../../shared/schemas/rating'

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
  const access = await openForAnswersQuickly(ctx, token)
  assertConsent(access.inv)
  const now = ctx.clock.now()
  const { session } = access
  // Before anything about the trials: a player who skipped the check learns nothing more.
  if (access.headphone) assertStandingFinished(access.headphone)
  else await assertHeadphoneFinished(ctx.knex, session, access.inv.id)
  // Checking the answer needs no lock: the plan is fixed once anyone has answered.
  const trials = await plannedTrials(ctx.knex, session, access.inv)
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
  const payload = JSON.stringify(storedAnswer(trial, answer))

  // Synchronous, so the busiest write path holds the connection for the least time; saves that
  // arrive together share one commit (groupCommit.ts), and each is answered once it is on disk.
  return groupCommit(ctx.knex, (db) => {
    checkStillOpen(db.get<StillOpenRow>(STILL_OPEN_SQL, access.inv.id), access, now)
    const { inv } = access
    // This trial's stored answer and the player's count in one read.
    const mine = db.get<{ n: number; id: number | null; payload: string | null }>(
      'select count(*) as n, max(case when trial_index = ? then id end) as id, ' +
        'max(case when trial_index = ? then payload end) as payload ' +
        'from answers where invitation_id = ?',
      trialIndex,
      trialIndex,
      inv.id,
    )!
    const existing = mine.id === null ? undefined : { id: mine.id, payload: mine.payload! }
    const duplicate = existing !== undefined && sameAnswer(existing.payload, answer)
    const at = now.toISOString()
    if (!duplicate) {
      if (existing)
        db.run(
          'update answers set payload = ?, answered_at = ? where id = ?',
          payload,
          at,
          existing.id,
        )
      else
        db.run(
          'insert into answers (invitation_id, trial_index, payload, answered_at) values (?, ?, ?, ?)',
          inv.id,
          trialIndex,
          payload,
          at,
        )
    }
    const answered = Number(mine.n) + (existing ? 0 : 1)
    const done = answered >= trials.length
    // Only the first answer and the last one change the invitation's progress times.
    if (!inv.started_at || (done && !inv.completed_at))
      db.run(
        'update invitations set started_at = ?, completed_at = ? where id = ?',
        inv.started_at ?? at,
        inv.completed_at ?? (done ? at : null),
        inv.id,
      )
    return { saved: true as const, duplicate, answered, trialCount: trials.length, done }
  })
}
