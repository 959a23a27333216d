import type { Knex } from 'knex'
import request from 'supertest'
import { createApp } from '../../server/app'
import { loadConfig } from '../../server/config'
import { createKnex } from '../../server/db/knex'
import { prepareDatabase } from '../../server/db/prepare'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { storedAnswer } from '../../server/answers/stored'
import type { PlannedTrial } from '../../server/design/index.ts'
import { addPlayers, isoDay, openStudy, studyFixture } from '../server/sessionFixtures'

export const BIG = { players: 1000, recipes: 10, attributes: 6, duplicates: 10 }

/**
 * The findings bench's session, in a database file: 1,000 players × 10 recipes × 6 attributes,
 * every recipe shown twice (10 hidden repeats over one matched set of 10), all answered. It is
 * built through the API (design, opening, invitations) and answers are stored as the answer
 * service stores them, with values that differ by player, recipe, attribute and repeat.
 */
export async function buildBigSession(
  databaseFile: string,
  mediaDir: string,
  players = BIG.players,
) {
  const knex = createKnex(databaseFile)
  await prepareDatabase(knex)
  const config = {
    ...loadConfig({ NODE_ENV: 'test', DATABASE_FILE: databaseFile, MEDIA_DIR: mediaDir }),
    jwtSecret: 'bench-secret-bench-secret-bench-secret',
    workerThreads: 0,
    loginRateLimit: { windowMs: 60_000, max: 1000 },
    mailLimits: { reminderGapMs: 3_600_000, sessionMailsPerHour: 5000, resetsPerHour: 3 },
  }
  const mailer = { send: async () => {} }
  const app = createApp({ knex, config, mailer })
  const staff = request.agent(app)
  await staff
    .post('/api/auth/login')
    .send({ email: 'developer@ringdown.test', password: DEMO_PASSWORD })
  const { recipeIds, clipSets } = await studyFixture(knex, BIG.recipes, 1, 'Findings bench')
  const attributes = Array.from({ length: BIG.attributes }, (_, i) => ({
    key: `attribute_${i + 1}`,
    name: `Attribute ${i + 1}`,
    low: 'less',
    high: 'more',
  }))
  const { id } = await openStudy(staff, {
    name: 'Findings benchmark',
    format: 'rating',
    recipeIds,
    clipSets,
    attributes,
    duplicates: BIG.duplicates,
    deadline: isoDay(new Date(), 30),
  })
  const playerIds = await addPlayers(knex, players)
  for (let i = 0; i < playerIds.length; i += 500) {
    const r = await staff
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: playerIds.slice(i, i + 500) })
    if (r.status >= 300) throw new Error(`invite: ${r.status} ${JSON.stringify(r.body)}`)
  }
  await app.locals.ctx.outbox.stop(0)
  const answers = await answerAll(
    knex,
    id,
    attributes.map((a) => a.key),
  )
  await knex.destroy()
  return { sessionId: id, answers }
}

async function answerAll(knex: Knex, sessionId: number, keys: string[]): Promise<number> {
  const plans: { invitation_id: number; trials: string }[] = await knex('served_plans as s')
    .join('invitations as i', 'i.id', 's.invitation_id')
    .where('i.session_id', sessionId)
    .select('s.invitation_id', 's.trials')
  const now = new Date().toISOString()
  const rows = []
  for (const plan of plans) {
    const lean = (plan.invitation_id * 7919) % 21
    const trials = (JSON.parse(plan.trials) as { trials: PlannedTrial[] }).trials
    for (const [index, trial] of trials.entries()) {
      if (trial.kind !== 'rating') throw new Error('a rating session serves rating trials')
      const recipe = Number(trial.clip.recipeId)
      const values = Object.fromEntries(
        keys.map((k, a) => [
          k,
          Math.max(0, Math.min(100, 30 + lean + (recipe % 10) * (a + 1) + (index % 3))),
        ]),
      )
      rows.push({
        invitation_id: plan.invitation_id,
        trial_index: index,
        payload: JSON.stringify(storedAnswer(trial, { kind: 'rating', values })),
        answered_at: now,
      })
    }
  }
  for (let i = 0; i < rows.length; i += 500) await knex('answers').insert(rows.slice(i, i + 500))
  await knex('invitations')
    .where({ session_id: sessionId })
    .update({ started_at: now, completed_at: now })
  return rows.length
}
