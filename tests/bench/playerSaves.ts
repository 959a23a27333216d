import type { Knex } from 'knex'
import request from 'supertest'
import { systemClock } from '../../server/clock'
import { signInvitation } from '../../server/auth/invitationTokens'
import { addPlayers, isoDay, openStudy, studyFixture } from '../server/sessionFixtures'
import { answerFor, passHeadphoneCheck } from '../server/playerFixtures'
import type { Agent } from '../server/helpers'
import { BENCH_SECRET } from './serverProcess'

export interface PreparedSaves {
  sessionId: number
  /** One answer save per trial of every player, ready to send. */
  bodies: { path: string; body: string }[]
}

/**
 * An open rating session of three recipes with `players` invited players who have consented,
 * passed the headphone check and fetched their plan, as the rating page does before answering;
 * none of it is timed. The saves are returned, not sent.
 */
export async function prepareSaves(
  base: string,
  knex: Knex,
  staff: Agent,
  players: number,
  name = 'Submission benchmark',
): Promise<PreparedSaves> {
  const { recipeIds, clipSets } = await studyFixture(knex, 3, 2, 'Bench')
  const { id } = await openStudy(staff, {
    name,
    format: 'rating',
    recipeIds,
    clipSets,
    duplicates: 1,
    deadline: isoDay(new Date(), 7),
  })
  const playerIds = await addPlayers(knex, players)
  for (let i = 0; i < playerIds.length; i += 500)
    await staff
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: playerIds.slice(i, i + 500) })
  const invitations: { id: number; token_id: string }[] = await knex('invitations')
    .where({ session_id: id })
    .select('id', 'token_id')
  const deadline = isoDay(new Date(), 7)
  const perPlayer = new Map<number, PreparedSaves['bodies']>()
  const prepare = async (inv: { id: number; token_id: string }) => {
    const token = signInvitation(
      BENCH_SECRET,
      systemClock,
      { jti: inv.token_id, sub: inv.id },
      deadline,
    )
    await request(base).post('/api/player/consent').send({ token })
    await passHeadphoneCheck(base, token)
    const plan = (await request(base).get('/api/player/plan').set('X-Invitation-Token', token)).body
      .plan
    const keys = plan.attributes.map((a: { key: string }) => a.key)
    perPlayer.set(
      inv.id,
      plan.trials.map((trial: { index: number }) => ({
        path: `/api/player/answers/${trial.index}`,
        body: JSON.stringify({ token, answer: answerFor(trial as never, keys, inv.id) }),
      })),
    )
  }
  // A few players at a time: the setup is not what is measured, and one at a time is slow.
  for (let i = 0; i < invitations.length; i += 8)
    await Promise.all(invitations.slice(i, i + 8).map(prepare))
  const bodies = invitations.flatMap((inv) => perPlayer.get(inv.id)!)
  return { sessionId: id, bodies }
}

/** Answers of the session stored in the database: every acknowledged save must be there. */
export async function storedAnswers(knex: Knex, sessionId: number): Promise<number> {
  const [{ n }] = (await knex('answers')
    .join('invitations', 'invitations.id', 'answers.invitation_id')
    .where('invitations.session_id', sessionId)
    .count({ n: '*' })) as { n: number }[]
  return Number(n)
}
