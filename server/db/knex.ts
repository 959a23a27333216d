import { mkdirSync } from 'node:fs'
import { dirname } from 'node:path'
import knexFactory, { type Knex } from 'knex'

/**
 * One SQLite connection. WAL lets readers run beside the writer; the busy timeout makes a
 * second process (the knex CLI, a backup) wait instead of failing at once.
 */
export function createKnex(file: string): Knex {
  if (file !== ':memory:') mkdirSync(dirname(file), { recursive: true })
  return knexFactory({
    client: 'better-sqlite3',
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
          conn.pragma('synchronous = NORMAL')
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
