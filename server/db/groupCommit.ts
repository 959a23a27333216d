import type { Knex } from 'knex'
import { withConnection, type SyncDb } from './syncTransaction'

/**
 * Group commit for the busiest write path. Under FULL synchronous every commit waits for the
 * disk to flush the log, and on the answer path that flush costs more than the writes
 * themselves. Writes that arrive in the same turn of the event loop are run together in one
 * IMMEDIATE transaction, each inside its own savepoint, and committed with one flush. Nobody
 * is answered before that commit: an acknowledged write is as durable as before, and one
 * write that throws rolls back only itself.
 *
 * A write here must be synchronous and must not depend on another write of the same batch
 * having failed or succeeded (answers of different trials and players do not).
 */
export function groupCommit<T>(knex: Knex, fn: (db: SyncDb) => T): Promise<T> {
  let batcher = batchers.get(knex)
  if (!batcher) {
    batcher = new Batcher(knex)
    batchers.set(knex, batcher)
  }
  return batcher.run(fn)
}

/** How many writes one commit takes at most: a batch holds the event loop while it runs. */
export const MAX_BATCH = 128

const batchers = new WeakMap<Knex, Batcher>()

interface Waiting {
  fn: (db: SyncDb) => unknown
  resolve(value: unknown): void
  reject(err: unknown): void
}

type Outcome = { ok: true; value: unknown } | { ok: false; err: unknown }

class Batcher {
  private waiting: Waiting[] = []
  private flushing = false

  constructor(private readonly knex: Knex) {}

  run<T>(fn: (db: SyncDb) => T): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      this.waiting.push({ fn, resolve: resolve as (v: unknown) => void, reject })
      this.schedule()
    })
  }

  private schedule() {
    if (this.flushing) return
    this.flushing = true
    // After the current turn, so every request whose body arrived in it joins this commit.
    setImmediate(() => void this.flush())
  }

  private async flush() {
    let batch: Waiting[] = []
    try {
      // The batch is taken once the connection is ours: writes that came in while another
      // query held it join this commit too.
      const outcomes = await withConnection(this.knex, (conn, db) => {
        batch = this.waiting.splice(0, MAX_BATCH)
        return conn
          .transaction(() =>
            batch.map((item): Outcome => {
              try {
                return { ok: true, value: conn.transaction(() => item.fn(db))() }
              } catch (err) {
                // Some errors (a full disk, an I/O error) make SQLite roll back the whole
                // transaction; the writes after it would then commit one by one unseen.
                if (!conn.inTransaction) throw err
                return { ok: false, err }
              }
            }),
          )
          .immediate()
      })
      outcomes.forEach((o, i) => (o.ok ? batch[i].resolve(o.value) : batch[i].reject(o.err)))
    } catch (err) {
      // BEGIN or COMMIT failed, or the connection could not be had: nothing of it was stored.
      for (const item of batch) item.reject(err)
      if (batch.length === 0) for (const item of this.waiting.splice(0)) item.reject(err)
    } finally {
      this.flushing = false
      if (this.waiting.length) this.schedule()
    }
  }
}
