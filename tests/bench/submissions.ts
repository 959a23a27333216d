import { spawn } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import autocannon from 'autocannon'
import request from 'supertest'
import { createKnex } from '../../server/db/knex'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { round, type Figure } from './figure'
import { waitForHealth } from './childServer'
import { prepareSaves, storedAnswers } from './playerSaves'
import { startServer } from './serverProcess'

const PLAYERS = 500
const PORT = 3917
const BARE_PORT = 3918
const CONNECTIONS = 20

type Bodies = { path: string; body: string }[]

/**
 * Requests per second over the whole run. autocannon's own average is over whole-second
 * buckets, which for a run of a few seconds says more about where the seconds fell.
 */
const rateOf = (r: autocannon.Result) =>
  r.requests.total / ((r.finish.getTime() - r.start.getTime()) / 1000)

/** Sends every save once over 20 connections and reports what the load generator saw. */
async function send(base: string, bodies: Bodies) {
  let next = 0
  return autocannon({
    url: base,
    connections: CONNECTIONS,
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
}

/** The same saves against a bare Express route in its own process: the yardstick. */
async function bareRate(bodies: Bodies): Promise<number> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'tests/bench/bareExpress.ts'], {
    env: { ...process.env, PORT: String(BARE_PORT) },
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  try {
    await waitForHealth(`http://127.0.0.1:${BARE_PORT}`, 200)
    return rateOf(await send(`http://127.0.0.1:${BARE_PORT}`, bodies))
  } finally {
    child.kill('SIGTERM')
    await new Promise((r) => child.once('exit', r))
  }
}

/**
 * Rating submissions on loopback: 500 players each saving every trial of a rating session,
 * sent by a load generator in this process to the real server in its own process, on a SQLite
 * file, as `npm start` runs it (request logs included). Every request must be acknowledged and
 * every answer must be in the database afterwards. The same client then sends the same saves
 * to a bare Express route, before and after, for the ratio.
 */
export async function submissionFigures(): Promise<Figure[]> {
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-bench-'))
  const databaseFile = join(dir, 'bench.sqlite')
  const server = await startServer({
    port: PORT,
    databaseFile,
    mediaDir: join(dir, 'media'),
  })
  const knex = createKnex(databaseFile)
  try {
    const staff = request.agent(server.base)
    await staff
      .post('/api/auth/login')
      .send({ email: 'developer@ringdown.test', password: DEMO_PASSWORD })
    const { sessionId, bodies } = await prepareSaves(server.base, knex, staff, PLAYERS)

    const bareBefore = await bareRate(bodies)
    const result = await send(server.base, bodies)
    const bareAfter = await bareRate(bodies)
    const bare = (bareBefore + bareAfter) / 2
    const rate = rateOf(result)

    const lost =
      bodies.length - (await storedAnswers(knex, sessionId)) + result.non2xx + result.errors
    return [
      {
        name: `rating submissions (${bodies.length} saves, ${CONNECTIONS} connections)`,
        value: round(rate, 0),
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
        name: 'rating submissions against a bare Express route (same client, same run)',
        value: round((100 * rate) / bare, 0),
        unit: `% (bare route ${round(bare, 0)} per second)`,
        target: '>= 60',
        better: 'higher',
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
    await server.stop()
    await knex.destroy()
    rmSync(dir, { recursive: true, force: true })
  }
}
