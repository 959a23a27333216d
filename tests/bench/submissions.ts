import { spawn } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import autocannon from 'autocannon'
import request from 'supertest'
import { createKnex } from '../../server/db/knex'
import { systemClock } from '../../server/clock'
import { signInvitation } from '../../server/auth/invitationTokens'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { addPlayers, isoDay, openStudy, studyFixture } from '../server/sessionFixtures'
import { answerFor, passHeadphoneCheck } from '../server/playerFixtures'
import { round, type Figure } from './figure'
import { waitForHealth } from './childServer'

const PLAYERS = 500
const PORT = 3917
const SECRET = 'bench-secret-bench-secret-bench-secret'

/**
 * Rating submissions on loopback: 500 players each saving every trial of a rating session,
 * sent by a load generator in this process to the real server in its own process, on a SQLite
 * file, as `npm start` runs it (request logs included). Every request must be acknowledged and
 * every answer must be in the database afterwards.
 */
export async function submissionFigures(): Promise<Figure[]> {
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-bench-'))
  const databaseFile = join(dir, 'bench.sqlite')
  const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      ...process.env,
      // The demo sessions and their audio are not wanted here (and would write into media/).
      NODE_ENV: 'test',
      PORT: String(PORT),
      DATABASE_FILE: databaseFile,
      MEDIA_DIR: join(dir, 'media'),
      JWT_SECRET: SECRET,
      RINGDOWN_API_ONLY: '1',
      LOGIN_RATE_MAX: '100000',
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  const base = `http://127.0.0.1:${PORT}`
  const knex = createKnex(databaseFile)
  try {
    await waitForHealth(base, 200)
    const staff = request.agent(base)
    await staff
      .post('/api/auth/login')
      .send({ email: 'developer@ringdown.test', password: DEMO_PASSWORD })
    const { recipeIds, clipSets } = await studyFixture(knex, 3, 2, 'Bench')
    const { id } = await openStudy(staff, {
      name: 'Submission benchmark',
      format: 'rating',
      recipeIds,
      clipSets,
      duplicates: 1,
      deadline: isoDay(new Date(), 7),
    })
    const playerIds = await addPlayers(knex, PLAYERS)
    await staff.post(`/api/sessions/${id}/invitations`).send({ playerIds })
    const invitations: { id: number; token_id: string }[] = await knex('invitations')
      .where({ session_id: id })
      .select('id', 'token_id')
    const deadline = isoDay(new Date(), 7)

    // Each player consents, passes the headphone check and fetches their plan, as the rating
    // page does before answering; none of it is timed.
    const bodies: { path: string; body: string }[] = []
    for (const inv of invitations) {
      const token = signInvitation(
        SECRET,
        systemClock,
        { jti: inv.token_id, sub: inv.id },
        deadline,
      )
      await request(base).post('/api/player/consent').send({ token })
      await passHeadphoneCheck(base, token)
      const plan = (await request(base).get('/api/player/plan').set('X-Invitation-Token', token))
        .body.plan
      const keys = plan.attributes.map((a: { key: string }) => a.key)
      for (const trial of plan.trials)
        bodies.push({
          path: `/api/player/answers/${trial.index}`,
          body: JSON.stringify({ token, answer: answerFor(trial, keys, inv.id) }),
        })
    }

    let next = 0
    const result = await autocannon({
      url: base,
      connections: 20,
      amount: bodies.length,
      requests: [
        {
          method: 'PUT',
          headers: { 'content-type': 'application/json' },
          setupRequest: (req) => {
            const b = bodies[next++ % bodies.length]
            return { ...req, path: b.path, body: b.body }
          },
        },
      ],
    })
    const [{ n }] = (await knex('answers')
      .join('invitations', 'invitations.id', 'answers.invitation_id')
      .where('invitations.session_id', id)
      .count({ n: '*' })) as { n: number }[]
    const lost = bodies.length - Number(n) + result.non2xx + result.errors
    return [
      {
        name: `rating submissions (${bodies.length} saves, 20 connections)`,
        value: round(result.requests.average, 0),
        unit: 'per second',
        target: '>= 1500',
        better: 'higher',
      },
      {
        name: 'rating submission latency p99',
        value: round(result.latency.p99, 1),
        unit: 'ms',
        target: '< 50',
        better: 'lower',
      },
      {
        name: 'rating submissions lost or refused',
        value: lost,
        unit: 'answers',
        target: '0',
        better: 'lower',
      },
    ]
  } finally {
    server.kill('SIGTERM')
    await new Promise((r) => server.once('exit', r))
    await knex.destroy()
    rmSync(dir, { recursive: true, force: true })
  }
}
