import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import pino from 'pino'
import { createWorkerPool } from '../../server/workers/pool'
import { findingsOutcome } from '../../server/workers/findingsTask'
import { createApp, type RingdownApp } from '../../server/app'
import { testConfig } from '../../server/config'
import { createKnex } from '../../server/db/knex'
import { computeSessionFindings } from '../../server/findings/service'
import type { Knex } from 'knex'
import { buildBigSession } from '../bench/bigSession'
import { signInAs } from './helpers'

// Findings of a large session are computed in a worker thread from the database file: the
// page is the one computed inline, and the event loop keeps turning meanwhile.

const dir = mkdtempSync(join(tmpdir(), 'ringdown-findings-thread-'))
const databaseFile = join(dir, 'thread.sqlite')
let knex: Knex
let app: RingdownApp
let sessionId: number

beforeAll(async () => {
  sessionId = (await buildBigSession(databaseFile, join(dir, 'media'), 400)).sessionId
  knex = createKnex(databaseFile)
  app = createApp({
    knex,
    config: testConfig({ databaseFile, mediaDir: join(dir, 'media'), workerThreads: 1 }),
    mailer: { send: async () => {} },
    logger: pino({ level: 'silent' }),
  })
}, 60_000)

afterAll(async () => {
  await app.locals.ctx.pool.close()
  await knex.destroy()
  rmSync(dir, { recursive: true, force: true })
})

describe('findings in a worker thread', () => {
  it('equal the findings computed on the main thread, and leave the event loop free', async () => {
    const analyst = await signInAs(app, 'analyst')
    let longestGap = 0
    let last = performance.now()
    const ticker = setInterval(() => {
      const now = performance.now()
      longestGap = Math.max(longestGap, now - last)
      last = now
    }, 2)
    const started = performance.now()
    const res = await analyst.get(`/api/findings/${sessionId}`)
    const took = performance.now() - started
    clearInterval(ticker)
    expect(res.status).toBe(200)
    expect(app.locals.ctx.pool.load().done).toBeGreaterThan(0)

    const inlineStarted = performance.now()
    const inline = (await computeSessionFindings(knex, sessionId, {})).findings
    const inlineTook = performance.now() - inlineStarted
    expect(res.text).toBe(JSON.stringify(inline))
    // The thread's work took as long as the main thread's would have, yet no timer waited for
    // more than a fraction of it.
    expect(inlineTook).toBeGreaterThan(40)
    expect(longestGap).toBeLessThan(Math.max(30, took / 3))
  }, 60_000)

  it('answer a missing session with 404, and a damaged answer with the thread’s own 409', async () => {
    const analyst = await signInAs(app, 'analyst')
    expect((await analyst.get('/api/findings/99999')).status).toBe(404)
    const damaged: { id: number } = await knex('answers').orderBy('id').first('id')
    await knex('answers').where(damaged).update({ payload: 'not an answer' })
    const res = await analyst.get(`/api/findings/${sessionId}`)
    expect(res.status).toBe(409)
    expect(res.body.error.message).toContain(`Answer ${damaged.id} cannot be read`)
  })

  it('warm up before the server is ready, reading no session', async () => {
    const pool = createWorkerPool(1, { warmUpDatabase: databaseFile })
    try {
      expect(pool.load().starting).toBe(true)
      const started = performance.now()
      while (pool.load().starting && performance.now() - started < 60_000)
        await new Promise((r) => setTimeout(r, 20))
      expect(pool.load().starting).toBe(false)
      // The warm-up is not counted as work done for anyone.
      expect(pool.load()).toMatchObject({ done: 0, failed: 0 })
      // And the warmed thread answers as the main thread does.
      expect(await pool.run('findings', databaseFile, sessionId, {})).toEqual(
        await findingsOutcome(knex, sessionId, {}),
      )
    } finally {
      await pool.close()
    }
  }, 90_000)
})
