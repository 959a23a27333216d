import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { createKnex } from '../../server/db/knex'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { round, type Figure } from './figure'
import { BIG, buildBigSession } from './bigSession'
import { prepareSaves } from './playerSaves'
import { percentile, startServer } from './serverProcess'
import { sendSaves } from './sendSaves'

const PORT = 3921
const SAVERS = 150

async function timed<T>(fn: () => Promise<T>): Promise<[number, T]> {
  const start = performance.now()
  const result = await fn()
  return [performance.now() - start, result]
}

const median = (xs: number[]) => percentile(xs, 50)

/**
 * Findings through HTTP from the database, on the 1,000-player session: the first request after
 * the server starts, a request after a change (an exclusion and its reversal, each answered
 * with the recomputed page), a cached request, and what players and the health check see
 * while findings are recomputed again and again.
 */
export async function findingsHttpFigures(): Promise<Figure[]> {
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-bench-'))
  const databaseFile = join(dir, 'bench.sqlite')
  const mediaDir = join(dir, 'media')
  const { sessionId, answers } = await buildBigSession(databaseFile, mediaDir)
  const server = await startServer({ port: PORT, databaseFile, mediaDir })
  const knex = createKnex(databaseFile)
  try {
    const analyst = request.agent(server.base)
    await analyst
      .post('/api/auth/login')
      .send({ email: 'analyst@ringdown.test', password: DEMO_PASSWORD })
    const path = `/api/findings/${sessionId}`
    const [first, page] = await timed(() => analyst.get(path))
    if (page.status !== 200) throw new Error(`findings: ${page.status}`)
    const { code: someone }: { code: string } = await knex('invitations as i')
      .join('players as p', 'p.id', 'i.player_id')
      .where('i.session_id', sessionId)
      .first('p.code')

    const cached: number[] = []
    for (let i = 0; i < 20; i++) cached.push((await timed(() => analyst.get(path)))[0])

    const toggle = async (i: number) => {
      const r =
        i % 2 === 0
          ? await analyst
              .post(`${path}/exclusions`)
              .send({ playerCode: someone, reason: 'Benchmark: left out and taken back' })
          : await analyst
              .delete(`${path}/exclusions/${someone}`)
              .send({ reason: 'Benchmark: taken back in' })
      if (r.status !== 200) throw new Error(`exclusion: ${r.status} ${JSON.stringify(r.body)}`)
    }
    const afterChange: number[] = []
    for (let i = 0; i < 6; i++) afterChange.push((await timed(() => toggle(i)))[0])

    // Players save answers to another session while the analyst keeps changing this one.
    const developer = request.agent(server.base)
    await developer
      .post('/api/auth/login')
      .send({ email: 'developer@ringdown.test', password: DEMO_PASSWORD })
    const { bodies } = await prepareSaves(server.base, knex, developer, SAVERS, 'Saves meanwhile')
    let busy = true
    let recomputed = 0
    const analystLoop = (async () => {
      while (busy) await toggle(recomputed++)
    })()
    const health: number[] = []
    const healthLoop = (async () => {
      while (busy) {
        health.push((await timed(() => fetch(`${server.base}/api/health`)))[0])
        await new Promise((r) => setTimeout(r, 20))
      }
    })()
    const { result: saves } = await sendSaves(server.base, bodies, 20)
    busy = false
    await Promise.all([analystLoop, healthLoop])

    const label = `${BIG.players} players, ${answers} answers`
    return [
      {
        name: `findings through HTTP, first request after start (${label})`,
        value: round(first),
        unit: 'ms',
        target: '< 300',
        better: 'lower',
      },
      {
        name: 'findings through HTTP after an exclusion (recomputed, median)',
        value: round(median(afterChange)),
        unit: 'ms',
        target: '< 300',
        better: 'lower',
      },
      {
        name: 'findings through HTTP, unchanged session (cached, median)',
        value: round(median(cached)),
        unit: 'ms',
        target: '< 300',
        better: 'lower',
      },
      {
        name: `answer-save p99 while findings are recomputed (${recomputed} recomputations)`,
        value: round(saves.latency.p99, 1),
        unit: 'ms',
        target: '< 50',
        better: 'lower',
      },
      {
        name: 'health check p99 while findings are recomputed',
        value: round(percentile(health, 99), 1),
        unit: 'ms',
        target: '< 50',
        better: 'lower',
      },
      {
        name: 'answer saves refused or failed while findings are recomputed',
        value: saves.non2xx + saves.errors,
        unit: 'saves',
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
