import { Writable } from 'node:stream'
import { mkdtempSync, rmSync } from 'node:fs'
import { createRequire } from 'node:module'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Worker } from 'node:worker_threads'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import express from 'express'
import request from 'supertest'
import pino from 'pino'
import type { Knex } from 'knex'
import { errorHandler } from '../../server/http/errorHandler'
import { AppError } from '../../server/errors'
import { createApp } from '../../server/app'
import { testConfig } from '../../server/config'
import { createKnex } from '../../server/db/knex'
import { prepareDatabase } from '../../server/db/prepare'
import { syncTransaction } from '../../server/db/syncTransaction'
import { buildApp, fakeMailer, signInAs, type TestApp } from './helpers'
import { addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'
import { answerFor, invitedOf } from './playerFixtures'

// Storage trouble (a full disk, a read-only database or media folder, a database locked by
// another writer) is not the request's fault and not a bug: it answers 503 Service Unavailable
// with Retry-After (RFC 9110 §15.6.4 and §10.2.3: delay-seconds, a non-negative integer), so
// clients keep what they hold and try again. The error codes are SQLite's result codes
// (sqlite.org/rescode.html: SQLITE_BUSY 5, SQLITE_LOCKED 6, SQLITE_READONLY 8, SQLITE_FULL 13,
// and the extended SQLITE_BUSY_SNAPSHOT, SQLITE_READONLY_DBMOVED) and POSIX errno names
// (IEEE Std 1003.1 <errno.h>: ENOSPC, EDQUOT, EROFS, EACCES), as Node reports them.

function logSink() {
  const lines: { level: number; msg: string; cause?: string }[] = []
  const stream = new Writable({
    write(chunk, _enc, done) {
      for (const line of String(chunk).split('\n').filter(Boolean)) lines.push(JSON.parse(line))
      done()
    },
  })
  return { lines, logger: pino({ level: 'info' }, stream) }
}

const errors = <L extends { level: number }>(lines: L[]) => lines.filter((l) => l.level >= 50)

/** An app whose one route throws the given error, behind the real error handler. */
function throwing(err: unknown, logger = pino({ level: 'silent' })) {
  const app = express()
  app.post('/write', () => {
    throw err
  })
  app.use(errorHandler(logger))
  return app
}

const coded = (code: string, extra: Record<string, unknown> = {}) =>
  Object.assign(new Error(`${code}: simulated`), { code, ...extra })

describe('the error handler on storage trouble', () => {
  it.each([
    ['SQLITE_FULL', coded('SQLITE_FULL'), 'run out of storage space'],
    ['ENOSPC (media disk full)', coded('ENOSPC', { syscall: 'write' }), 'run out of storage space'],
    ['EDQUOT (quota used up)', coded('EDQUOT', { syscall: 'write' }), 'run out of storage space'],
    ['SQLITE_READONLY', coded('SQLITE_READONLY'), 'cannot write to its storage'],
    ['SQLITE_READONLY_DBMOVED', coded('SQLITE_READONLY_DBMOVED'), 'cannot write to its storage'],
    ['EROFS (read-only mount)', coded('EROFS', { syscall: 'open' }), 'cannot write to its storage'],
    [
      'EACCES on a media write',
      coded('EACCES', { syscall: 'open' }),
      'cannot write to its storage',
    ],
    ['EACCES on a rename', coded('EACCES', { syscall: 'rename' }), 'cannot write to its storage'],
    ['SQLITE_BUSY', coded('SQLITE_BUSY'), 'busy'],
    ['SQLITE_BUSY_SNAPSHOT', coded('SQLITE_BUSY_SNAPSHOT'), 'busy'],
    ['SQLITE_LOCKED', coded('SQLITE_LOCKED'), 'busy'],
    ['a wrapped SQLITE_FULL', new Error('outer', { cause: coded('SQLITE_FULL') }), 'storage space'],
  ])('%s answers 503 unavailable with Retry-After, logged once', async (_name, err, words) => {
    const { lines, logger } = logSink()
    const res = await request(throwing(err, logger)).post('/write')
    expect(res.status).toBe(503)
    expect(res.body.error.code).toBe('unavailable')
    expect(res.body.error.message).toContain(words)
    expect(res.body.error.message).toContain('Nothing was saved')
    // Nothing internal in what the person sees.
    expect(res.body.error.message).not.toMatch(/SQLITE|E[A-Z]{3,}|simulated/)
    expect(res.headers['retry-after']).toMatch(/^\d+$/)
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0)
    const logged = errors(lines)
    expect(logged).toHaveLength(1)
    expect(['full', 'read_only', 'busy']).toContain(logged[0].cause)
  })

  it('leaves other errors as they were: a failed read of a folder is a bare 500', async () => {
    for (const err of [
      coded('EACCES', { syscall: 'scandir' }),
      new Error('boom'),
      coded('SQLITE_CORRUPT'),
    ]) {
      const res = await request(throwing(err)).post('/write')
      expect(res.status).toBe(500)
      expect(res.body.error.code).toBe('internal')
      expect(res.headers['retry-after']).toBeUndefined()
    }
  })

  it('gives a service error with the unavailable code its Retry-After too', async () => {
    const res = await request(throwing(new AppError('unavailable', 'Try later'))).post('/write')
    expect(res.status).toBe(503)
    expect(res.headers['retry-after']).toMatch(/^\d+$/)
  })
})

describe('real SQLite refusals through the app', () => {
  let t: TestApp
  const sink = logSink()

  beforeAll(async () => {
    t = await buildApp({ logger: sink.logger })
  })
  afterAll(() => t.close())

  it('a full database answers 503 and stores nothing', async () => {
    const developer = await signInAs(t.app, 'developer')
    const before = (await t.knex('recipes').count({ n: '*' }))[0].n
    // A database that may not grow (max_page_count at its size) whose pages are then filled is
    // full as a full disk is: SQLite answers SQLITE_FULL. A recipe with long notes needs a page.
    // The filler table comes first: once the file may not grow, even creating it can fail.
    await t.knex.raw('create table if not exists filler (x text)')
    const { page_count: pages } = (await t.knex.raw('pragma page_count'))[0]
    await t.knex.raw(`pragma max_page_count = ${pages}`)
    let refusal: string | undefined
    for (let i = 0; i < 10_000 && refusal === undefined; i++) {
      refusal = await t
        .knex('filler')
        .insert({ x: 'x'.repeat(300) })
        .then(
          () => undefined,
          (err: { code?: string }) => err.code ?? 'unknown',
        )
    }
    expect(refusal).toBe('SQLITE_FULL')
    sink.lines.length = 0
    const res = await developer.post('/api/recipes').send({
      name: 'Full disk probe',
      instrument: 'violin',
      stringName: 'A',
      core: 'synthetic multifilament',
      windings: [{ material: 'silver', profile: 'round', wireMm: 0.12 }],
      notes: 'n'.repeat(2000),
      dampingNotes: 'd'.repeat(2000),
      vibratingLengthMm: 328,
    })
    expect(res.status).toBe(503)
    expect(res.body.error.code).toBe('unavailable')
    expect(res.headers['retry-after']).toMatch(/^\d+$/)
    expect(errors(sink.lines)).toHaveLength(1)
    await t.knex.raw('drop table filler')
    expect((await t.knex('recipes').count({ n: '*' }))[0].n).toBe(before)
  })

  it('a database that cannot be written answers 503 and stores nothing', async () => {
    const developer = await signInAs(t.app, 'developer')
    const before = (await t.knex('excerpts').count({ n: '*' }))[0].n
    // query_only makes SQLite refuse every write with SQLITE_READONLY, as a read-only file does.
    await t.knex.raw('pragma query_only = 1')
    sink.lines.length = 0
    const res = await developer.post('/api/excerpts').send({ name: 'Read-only probe' })
    await t.knex.raw('pragma query_only = 0')
    expect(res.status).toBe(503)
    expect(res.body.error).toMatchObject({ code: 'unavailable' })
    expect(res.body.error.message).toContain('cannot write to its storage')
    expect(errors(sink.lines).map((l) => l.cause)).toEqual(['read_only'])
    expect((await t.knex('excerpts').count({ n: '*' }))[0].n).toBe(before)
  })
})

// ── A second process writing: the busy timeout must cover every write transaction. ──

const sqlitePath = createRequire(import.meta.url).resolve('better-sqlite3')

/** Another connection (in a thread: better-sqlite3 blocks) holds the write lock for `ms`. */
async function holdWriteLock(file: string, ms: number): Promise<{ released: Promise<void> }> {
  const worker = new Worker(
    `const { parentPort, workerData } = require('node:worker_threads')
     const Database = require(workerData.sqlitePath)
     const db = new Database(workerData.file)
     db.exec('BEGIN IMMEDIATE')
     db.prepare('update knex_migrations_lock set is_locked = is_locked').run()
     parentPort.postMessage('locked')
     Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, workerData.ms)
     db.exec('COMMIT')
     db.close()`,
    { eval: true, workerData: { sqlitePath, file, ms } },
  )
  await new Promise((resolve) => worker.once('message', resolve))
  // Wrapped: an async function returning a bare promise would wait for it.
  return { released: new Promise((resolve) => worker.once('exit', () => resolve())) }
}

describe('another writer holding the lock', () => {
  let dir: string
  let file: string
  let knex: Knex
  let t: TestApp

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'ringdown-busy-'))
    file = join(dir, 'busy.sqlite')
    knex = createKnex(file)
    await prepareDatabase(knex)
    const config = testConfig({ databaseFile: file, mediaDir: join(dir, 'media') })
    const mailer = fakeMailer()
    const app = createApp({ knex, config, mailer, logger: pino({ level: 'silent' }) })
    const settle = () => app.locals.ctx.outbox.settle()
    t = { app, knex, mailer, config, settle, close: async () => {} }
  })
  afterAll(async () => {
    await t.settle()
    await knex.destroy()
    rmSync(dir, { recursive: true, force: true })
  })

  it('an answer save waits for the lock and succeeds', async () => {
    const developer = await signInAs(t.app, 'developer')
    const { recipeIds } = await studyFixture(knex, 2, 1, 'Busy')
    const { id } = await openStudy(developer, {
      name: 'Busy play-test',
      format: 'playtest',
      recipeIds,
      clipSets: [],
      deadline: isoDay(new Date(), 7),
    })
    const playerIds = await addPlayers(knex, 1)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds })
    await t.settle()
    const [p] = await invitedOf(t, id)
    await request(t.app).post('/api/player/consent').send({ token: p.token }).expect(200)
    const plan = (await request(t.app).get('/api/player/plan').set('X-Invitation-Token', p.token))
      .body.plan
    const keys = plan.attributes.map((a: { key: string }) => a.key)
    const answer = answerFor(plan.trials[0], keys)

    const { released } = await holdWriteLock(file, 300)
    const started = performance.now()
    const res = await request(t.app)
      .put(`/api/player/answers/${plan.trials[0].index}`)
      .send({ token: p.token, answer })
    const waited = performance.now() - started
    await released
    expect(res.status).toBe(200)
    expect(res.body.saved).toBe(true)
    expect(waited).toBeGreaterThan(50)
    expect(await knex('answers').where({ invitation_id: p.id }).count({ n: '*' })).toEqual([
      { n: 1 },
    ])
  })

  it('a knex transaction that reads before it writes waits too', async () => {
    const { released } = await holdWriteLock(file, 200)
    const started = performance.now()
    await knex.transaction(async (trx) => {
      await trx('knex_migrations').count({ n: '*' })
      await trx('knex_migrations_lock').update({ is_locked: trx.raw('is_locked') })
    })
    expect(performance.now() - started).toBeGreaterThan(50)
    await released
  })

  it("a read-only connection's snapshot read leaves the write lock to the server", async () => {
    // The findings worker reads in one transaction on its own connection; begun IMMEDIATE it
    // would hold the write lock for the whole computation and every save would wait.
    const reader = createKnex(file, { readOnly: true })
    try {
      await reader.transaction(async (trx) => {
        await trx('knex_migrations').count({ n: '*' })
        const started = performance.now()
        await syncTransaction(
          knex,
          (db) => db.run('update knex_migrations_lock set is_locked = is_locked'),
          { busyTimeoutMs: 50 },
        )
        expect(performance.now() - started).toBeLessThan(40)
      })
      await expect(reader('knex_migrations_lock').update({ is_locked: 0 })).rejects.toMatchObject({
        code: expect.stringMatching(/^SQLITE_READONLY/),
      })
    } finally {
      await reader.destroy()
    }
  })
})

describe('durability setting', () => {
  it('opens with synchronous FULL unless told NORMAL', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'ringdown-sync-'))
    // PRAGMA synchronous reads back 2 for FULL and 1 for NORMAL (sqlite.org/pragma.html).
    for (const [options, expected] of [
      [{}, 2],
      [{ synchronous: 'FULL' as const }, 2],
      [{ synchronous: 'NORMAL' as const }, 1],
    ] as const) {
      const knex = createKnex(join(dir, 'sync.sqlite'), options)
      expect((await knex.raw('pragma synchronous'))[0].synchronous).toBe(expected)
      await knex.destroy()
    }
    rmSync(dir, { recursive: true, force: true })
  })
})
