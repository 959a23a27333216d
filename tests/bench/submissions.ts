import { spawn } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type autocannon from 'autocannon'
import request from 'supertest'
import { createKnex } from '../../server/db/knex'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { round, type Figure } from './figure'
import { waitForHealth } from './childServer'
import { prepareSaves, storedAnswers } from './playerSaves'
import { startServer } from './serverProcess'
import { sendSaves, type SaveBodies } from './sendSaves'

// Two sessions of 500 players (a session may mail at most 600 invitations an hour by default):
// 7,000 saves, a few seconds of load, so that a stray pause moves the rate little.
const PLAYERS = 500
const SESSIONS = 2
const PORT = 3917
const BARE_PORT = 3918
const CONNECTIONS = 20

/** The same saves against a bare Express route in its own process: the yardstick. */
async function bareRate(bodies: SaveBodies): Promise<number> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'tests/bench/bareExpress.ts'], {
    env: { ...process.env, PORT: String(BARE_PORT) },
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  try {
    await waitForHealth(`http://127.0.0.1:${BARE_PORT}`, 200)
    return (await sendSaves(`http://127.0.0.1:${BARE_PORT}`, bodies, CONNECTIONS)).rate
  } finally {
    child.kill('SIGTERM')
    await new Promise((r) => child.once('exit', r))
  }
}

interface Measured {
  result: autocannon.Result
  rate: number
  lost: number
  saves: number
  /** The bare route's rate, before and after, averaged; only when asked for. */
  bare?: number
}

/**
 * Starts the real server on a fresh database with the given durability, prepares the saves
 * (not timed), sends them once, and counts what is in the database afterwards.
 */
async function measure(synchronous: 'FULL' | 'NORMAL', withBare: boolean): Promise<Measured> {
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-bench-'))
  const databaseFile = join(dir, 'bench.sqlite')
  const server = await startServer({
    port: PORT,
    databaseFile,
    mediaDir: join(dir, 'media'),
    env: { DATABASE_SYNCHRONOUS: synchronous },
  })
  const knex = createKnex(databaseFile)
  try {
    const staff = request.agent(server.base)
    await staff
      .post('/api/auth/login')
      .send({ email: 'developer@ringdown.test', password: DEMO_PASSWORD })
    const prepared = []
    for (let i = 0; i < SESSIONS; i++)
      prepared.push(
        await prepareSaves(server.base, knex, staff, PLAYERS, `Submission bench ${i + 1}`),
      )
    const bodies = prepared.flatMap((p) => p.bodies)

    const bareBefore = withBare ? await bareRate(bodies) : 0
    const { result, rate } = await sendSaves(server.base, bodies, CONNECTIONS)
    const bareAfter = withBare ? await bareRate(bodies) : 0

    const stored = await Promise.all(prepared.map((p) => storedAnswers(knex, p.sessionId)))
    const lost = bodies.length - stored.reduce((a, b) => a + b) + result.non2xx + result.errors
    return {
      result,
      rate,
      lost,
      saves: bodies.length,
      bare: withBare ? (bareBefore + bareAfter) / 2 : undefined,
    }
  } finally {
    await server.stop()
    await knex.destroy()
    rmSync(dir, { recursive: true, force: true })
  }
}

/**
 * Rating submissions on loopback: 2 × 500 players each saving every trial of a rating session,
 * sent by a load generator in this process to the real server in its own process, on a SQLite
 * file, as `npm start` runs it (request logs included). Every request must be acknowledged and
 * every answer must be in the database afterwards. The same client sends the same saves to a
 * bare Express route, before and after, for the ratio. Then the same again on a server with
 * synchronous NORMAL, for what FULL (every acknowledged answer on disk) costs.
 */
export async function submissionFigures(): Promise<Figure[]> {
  const full = await measure('FULL', true)
  const normal = await measure('NORMAL', false)
  const { result, rate, bare } = full
  return [
    {
      name: `rating submissions (${full.saves} saves, ${CONNECTIONS} connections)`,
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
      value: round((100 * rate) / bare!, 0),
      unit: `% (bare route ${round(bare!, 0)} per second)`,
      target: '>= 60',
      better: 'higher',
    },
    {
      name: 'rating submissions lost or refused',
      value: full.lost + normal.lost,
      unit: 'answers',
      target: '0',
      better: 'lower',
    },
    {
      name: 'rating submissions with synchronous NORMAL (not durable on power loss; for the cost of FULL)',
      value: round(normal.rate, 0),
      unit: `per second, p99 ${round(normal.result.latency.p99, 1)} ms`,
      target: 'none: FULL is the default',
      better: 'higher',
    },
  ]
}
