import { mkdirSync } from 'node:fs'
import { createRequire } from 'node:module'
import { dirname } from 'node:path'
import knexFactory, { type Knex } from 'knex'

export interface KnexOptions {
  /**
   * SQLite's `synchronous` under WAL: FULL syncs the log at every commit, so an acknowledged
   * write survives a power cut; NORMAL syncs only at checkpoints, safe against a crashed process
   * but not against losing power. The server passes Config.databaseSynchronous.
   */
  synchronous?: 'FULL' | 'NORMAL'
  /**
   * A connection that only reads (the findings worker): its transactions begin DEFERRED, so a
   * snapshot read never takes the write lock from the server's own connection, and SQLite
   * refuses any write on it (`query_only`).
   */
  readOnly?: boolean
}

/**
 * One SQLite connection. WAL lets readers run beside the writer; the busy timeout makes a
 * second process (the knex CLI, a backup) wait instead of failing at once, and every
 * transaction begins IMMEDIATE so that the wait applies to it (see ImmediateClient).
 */
export function createKnex(file: string, options: KnexOptions = {}): Knex {
  const synchronous = options.synchronous ?? 'FULL'
  if (file !== ':memory:') mkdirSync(dirname(file), { recursive: true })
  return knexFactory({
    client: options.readOnly ? BetterSqlite3Client : ImmediateClient,
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: Connection, done: (err: Error | null) => void) {
        try {
          cacheStatements(conn)
          if (file !== ':memory:') conn.pragma('journal_mode = WAL')
          conn.pragma('foreign_keys = ON')
          conn.pragma('busy_timeout = 5000')
          if (options.readOnly) conn.pragma('query_only = ON')
          conn.pragma(`synchronous = ${synchronous}`)
          done(null)
        } catch (err) {
          done(err as Error)
        }
      },
    },
    migrations: { directory: migrationsDir, extension: 'ts', loadExtensions: ['.ts'] },
    seeds: { directory: seedsDir, extension: 'ts', loadExtensions: ['.ts'] },
  })
}

// knex offers no option for how a transaction begins, but takes a client class; its SQLite
// transaction has one `begin` method. These are knex's own modules (knex has no exports map);
// tests/server/storageErrors.test.ts fails if an upgrade moves them or changes how they begin.
const require = createRequire(import.meta.url)
const BetterSqlite3Client = require('knex/lib/dialects/better-sqlite3') as typeof Knex.Client
const SqliteTransaction = require('knex/lib/dialects/sqlite3/execution/sqlite-transaction') as new (
  ...args: unknown[]
) => { query(conn: unknown, sql: string): Promise<unknown> }

/**
 * A knex transaction that reads and then writes would begin DEFERRED and, when another process
 * holds the write lock, get SQLITE_BUSY at its first write without waiting (a reader cannot turn
 * writer while another writer holds the lock). BEGIN IMMEDIATE takes the write lock at once,
 * where the busy timeout applies. With one connection in this process nothing here runs beside
 * a transaction anyway, so read-only transactions lose nothing by taking the lock too; nested
 * transactions are savepoints and are left alone. Connections of other threads that only read
 are made with `readOnly` and keep knex's deferred begin.
 */
class ImmediateTransaction extends SqliteTransaction {
  begin(conn: unknown) {
    return this.query(conn, 'BEGIN IMMEDIATE;')
  }
}

class ImmediateClient extends BetterSqlite3Client {
  override transaction(...args: unknown[]) {
    return new ImmediateTransaction(this, ...args) as unknown as Knex.Transaction
  }

  // Who holds the one connection. Taking it from the pool costs more than a short synchronous
  // read or write on it (tarn's promises and timers, twice per answer save), and synchronous
  // work cannot interleave with anything: so when nothing holds the connection, that work may
  // use it directly (see idleConnection and syncTransaction.ts).
  private held = 0
  private last: SyncConnection | undefined

  override async acquireConnection() {
    const conn = (await super.acquireConnection()) as SyncConnection
    this.held++
    this.last = conn
    return conn
  }

  override releaseConnection(conn: unknown) {
    this.held--
    return super.releaseConnection(conn)
  }

  /**
   * The connection, when no query, transaction or migration holds it (a knex transaction holds
   * it from BEGIN to COMMIT, across its awaits), for work that is done before this call returns.
   * Undefined otherwise: the caller then waits its turn in the pool.
   */
  idleConnection(): SyncConnection | undefined {
    const conn = this.last
    return this.held === 0 && conn?.open && !conn.inTransaction ? conn : undefined
  }
}

interface SyncConnection {
  readonly open: boolean
  readonly inTransaction: boolean
}

interface Connection {
  pragma(s: string): unknown
  prepare(sql: string): unknown
}

const STATEMENTS_KEPT = 500

/**
 * Knex prepares every statement afresh; on the answer path that parsing cost as much as running
 * the queries. A prepared statement can be run again with new values, and this connection is
 * the only one (pool of one), so each SQL text is prepared once and kept.
 */
function cacheStatements(conn: Connection) {
  const prepare = conn.prepare.bind(conn)
  const kept = new Map<string, unknown>()
  conn.prepare = (sql: string) => {
    let statement = kept.get(sql)
    if (statement === undefined) {
      statement = prepare(sql)
      kept.set(sql, statement)
      if (kept.size > STATEMENTS_KEPT) kept.delete(kept.keys().next().value!)
    }
    return statement
  }
}

export const migrationsDir = new URL('../../migrations', import.meta.url).pathname
export const seedsDir = new URL('../../seeds', import.meta.url).pathname
