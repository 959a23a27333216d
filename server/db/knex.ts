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
      afterCreate(conn: { pragma(s: string): unknown }, done: (err: Error | null) => void) {
        try {
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

export const migrationsDir = new URL('../../migrations', import.meta.url).pathname
export const seedsDir = new URL('../../seeds', import.meta.url).pathname
