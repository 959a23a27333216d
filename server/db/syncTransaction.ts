import type { Knex } from 'knex'

/** The few better-sqlite3 calls the synchronous path needs. */
interface RawStatement {
  get(...params: unknown[]): unknown
  run(...params: unknown[]): { changes: number }
}
interface RawConnection {
  prepare(sql: string): RawStatement
  transaction<T>(fn: () => T): () => T
}

export interface SyncDb {
  get<T>(sql: string, ...params: unknown[]): T | undefined
  run(sql: string, ...params: unknown[]): number
}

/**
 * Runs `fn` as one SQLite transaction on knex's own connection, without a single await inside.
 * better-sqlite3 is synchronous, so this holds the only connection for the shortest possible
 * time; the busiest write path (saving answers) uses it. Throwing inside rolls everything back.
 */
export async function syncTransaction<T>(knex: Knex, fn: (db: SyncDb) => T): Promise<T> {
  return withConnection(knex, (conn, db) => conn.transaction(() => fn(db))())
}

/** Reads without a transaction, on the same terms. */
export async function syncRead<T>(knex: Knex, fn: (db: SyncDb) => T): Promise<T> {
  return withConnection(knex, (_conn, db) => fn(db))
}

async function withConnection<T>(
  knex: Knex,
  fn: (conn: RawConnection, db: SyncDb) => T,
): Promise<T> {
  const client = knex.client as unknown as {
    acquireConnection(): Promise<RawConnection>
    releaseConnection(conn: RawConnection): Promise<unknown>
  }
  const conn = await client.acquireConnection()
  try {
    const db: SyncDb = {
      get: <R>(sql: string, ...params: unknown[]) => conn.prepare(sql).get(...params) as R,
      run: (sql, ...params) => conn.prepare(sql).run(...params).changes,
    }
    return fn(conn, db)
  } finally {
    await client.releaseConnection(conn)
  }
}
