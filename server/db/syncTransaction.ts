import type { Knex } from 'knex'

/** The few better-sqlite3 calls the synchronous path needs. */
interface RawStatement {
  get(...params: unknown[]): unknown
  run(...params: unknown[]): { changes: number }
}
export interface RawConnection {
  prepare(sql: string): RawStatement
  /** Called plainly inside another transaction, it runs as a savepoint. */
  transaction<T>(fn: () => T): { (): T; immediate(): T }
  readonly inTransaction: boolean
  pragma(source: string, options: { simple: true }): unknown
}

export interface SyncDb {
  get<T>(sql: string, ...params: unknown[]): T | undefined
  run(sql: string, ...params: unknown[]): number
}

/**
 * Runs `fn` as one SQLite transaction on knex's own connection, without a single await inside.
 * better-sqlite3 is synchronous, so this holds the only connection for the shortest possible
 * time; the busiest write path (saving answers) uses it. Throwing inside rolls everything back.
 *
 * It begins IMMEDIATE: the write lock is taken at BEGIN, where SQLite waits out the busy
 * timeout for another process (a backup, the knex CLI) to finish. A deferred transaction that
 * reads first and then writes gets SQLITE_BUSY at once instead, without waiting: SQLite cannot
 * let a reader turn writer while another writer holds the lock.
 *
 * `busyTimeoutMs` shortens the wait for this one transaction (a health probe must not hold the
 * only connection for the full timeout).
 */
export async function syncTransaction<T>(
  knex: Knex,
  fn: (db: SyncDb) => T,
  options: { busyTimeoutMs?: number } = {},
): Promise<T> {
  return withConnection(knex, (conn, db) => {
    if (options.busyTimeoutMs === undefined) return conn.transaction(() => fn(db)).immediate()
    const before = conn.pragma('busy_timeout', { simple: true })
    conn.pragma(`busy_timeout = ${Math.max(0, Math.floor(options.busyTimeoutMs))}`, {
      simple: true,
    })
    try {
      return conn.transaction(() => fn(db)).immediate()
    } finally {
      conn.pragma(`busy_timeout = ${Number(before)}`, { simple: true })
    }
  })
}

/** Reads without a transaction, on the same terms. */
export async function syncRead<T>(knex: Knex, fn: (db: SyncDb) => T): Promise<T> {
  return withConnection(knex, (_conn, db) => fn(db))
}

/** Runs `fn` on knex's own connection, acquired and released around it. */
export async function withConnection<T>(
  knex: Knex,
  fn: (conn: RawConnection, db: SyncDb) => T,
): Promise<T> {
  const client = knex.client as unknown as {
    acquireConnection(): Promise<RawConnection>
    releaseConnection(conn: RawConnection): Promise<unknown>
    /** createKnex's client has it: the connection when nothing holds it (knex.ts). */
    idleConnection?(): RawConnection | undefined
  }
  // Nothing can come between here and the end of fn: it is synchronous.
  const idle = client.idleConnection?.()
  if (idle) return fn(idle, syncDb(idle))
  const conn = await client.acquireConnection()
  try {
    return fn(conn, syncDb(conn))
  } finally {
    await client.releaseConnection(conn)
  }
}

const syncDb = (conn: RawConnection): SyncDb => ({
  get: <R>(sql: string, ...params: unknown[]) => conn.prepare(sql).get(...params) as R,
  run: (sql, ...params) => conn.prepare(sql).run(...params).changes,
})
