import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../server/db/knex'
import { groupCommit, MAX_BATCH } from '../../server/db/groupCommit'
import { syncRead } from '../../server/db/syncTransaction'

// Group commit: writes that arrive together share one transaction and one flush, each in its
// own savepoint. What must hold is what a single transaction per write gave: every resolved
// write is stored and visible to another connection, a write that throws leaves nothing, and a
// commit that fails fails every write in it.

let dir: string
let knex: Knex
let other: Knex

beforeEach(async () => {
  dir = mkdtempSync(join(tmpdir(), 'ringdown-group-'))
  knex = createKnex(join(dir, 'db.sqlite'))
  other = createKnex(join(dir, 'db.sqlite'))
  await knex.schema.createTable('notes', (t) => {
    t.increments('id')
    t.integer('n').notNullable().unique()
  })
})

afterEach(async () => {
  await knex.destroy()
  await other.destroy()
  rmSync(dir, { recursive: true, force: true })
})

const insert = (n: number) =>
  groupCommit(knex, (db) => db.run('insert into notes (n) values (?)', n))

/** Counts the transactions begun on the connection (each batch begins one, IMMEDIATE). */
async function countTransactions(k: Knex): Promise<{ count: number }> {
  type Tx = { (): unknown; immediate(): unknown }
  const client = k.client as {
    acquireConnection(): Promise<{ transaction(fn: () => unknown): Tx }>
    releaseConnection(conn: unknown): Promise<unknown>
  }
  const conn = await client.acquireConnection()
  await client.releaseConnection(conn)
  const original = conn.transaction.bind(conn)
  const counter = { count: 0 }
  conn.transaction = (fn) => {
    const tx = original(fn)
    return Object.assign(() => tx(), {
      immediate: () => {
        counter.count++
        return tx.immediate()
      },
    })
  }
  return counter
}

describe('group commit', () => {
  it('stores writes sent together in one transaction, each answered with its own result', async () => {
    const begun = await countTransactions(knex)
    const results = await Promise.all(Array.from({ length: 50 }, (_, i) => insert(i)))
    expect(results).toEqual(Array(50).fill(1))
    expect(begun.count).toBe(1)
    expect(await other('notes').count({ c: '*' })).toEqual([{ c: 50 }])
  })

  it('answers a write only once another connection can read it', async () => {
    const seen = await Promise.all(
      [1, 2, 3].map((n) =>
        insert(n).then(async () => (await other('notes').where({ n }).first()) !== undefined),
      ),
    )
    expect(seen).toEqual([true, true, true])
  })

  it('rolls back only the write that throws, and tells only its sender', async () => {
    const outcomes = await Promise.allSettled([
      insert(1),
      groupCommit(knex, (db) => {
        db.run('insert into notes (n) values (?)', 2)
        throw new Error('this write changed its mind')
      }),
      insert(1), // a unique key broken: SQLite's own error, for this write alone
      insert(3),
    ])
    expect(outcomes.map((o) => o.status)).toEqual([
      'fulfilled',
      'rejected',
      'rejected',
      'fulfilled',
    ])
    expect((outcomes[1] as PromiseRejectedResult).reason.message).toBe(
      'this write changed its mind',
    )
    expect((outcomes[2] as PromiseRejectedResult).reason.code).toBe('SQLITE_CONSTRAINT_UNIQUE')
    expect((await other('notes').orderBy('n').select('n')).map((r) => r.n)).toEqual([1, 3])
  })

  it('fails every write of a batch whose transaction SQLite ended, and stores none of them', async () => {
    const outcomes = await Promise.allSettled([
      insert(1),
      groupCommit(knex, (db) => db.run('rollback')),
      insert(3),
    ])
    expect(outcomes.every((o) => o.status === 'rejected')).toBe(true)
    expect(await other('notes').count({ c: '*' })).toEqual([{ c: 0 }])
    // The connection is left usable for the next batch.
    await insert(4)
    expect((await other('notes').select('n')).map((r) => r.n)).toEqual([4])
  })

  it('fails every write of a batch whose commit cannot begin, and stores none of them', async () => {
    await knex.raw('pragma busy_timeout = 50')
    // Another process's writer holds the lock (a backup, the knex CLI).
    const held = await other.transaction()
    await held.raw('insert into notes (n) values (100)')
    const outcomes = await Promise.allSettled([insert(1), insert(2)])
    expect(outcomes.map((o) => o.status)).toEqual(['rejected', 'rejected'])
    expect((outcomes[0] as PromiseRejectedResult).reason.code).toBe('SQLITE_BUSY')
    await held.rollback()
    expect(await other('notes').count({ c: '*' })).toEqual([{ c: 0 }])
  })

  it(`takes at most ${MAX_BATCH} writes per commit and runs the rest in the next`, async () => {
    const begun = await countTransactions(knex)
    await Promise.all(Array.from({ length: MAX_BATCH + 10 }, (_, i) => insert(i)))
    expect(begun.count).toBe(2)
    expect(await other('notes').count({ c: '*' })).toEqual([{ c: MAX_BATCH + 10 }])
  })

  it('waits for a knex transaction that holds the connection, and never writes inside it', async () => {
    const trx = await knex.transaction()
    await trx('notes').insert({ n: 1 })
    const write = insert(2)
    const read = syncRead(knex, (db) => db.get<{ c: number }>('select count(*) as c from notes'))
    // Several turns of the event loop: the batch would have run by now had it not waited.
    for (let i = 0; i < 5; i++) await new Promise((r) => setImmediate(r))
    await trx.rollback()
    await write
    expect(await read).toEqual({ c: 0 })
    expect((await other('notes').select('n')).map((r) => r.n)).toEqual([2])
  })
})
