import { createRequire } from 'node:module'
import { BackupError } from './manifest'

// better-sqlite3 is the driver knex already loads; these are the few calls a backup makes.
interface Statement {
  get(...params: unknown[]): unknown
  all(...params: unknown[]): unknown[]
}
interface Progress {
  totalPages: number
  remainingPages: number
}
interface SqliteDatabase {
  backup(file: string, options?: { progress?: (p: Progress) => number | void }): Promise<Progress>
  pragma(source: string, options?: { simple?: boolean }): unknown
  prepare(sql: string): Statement
  close(): void
}
type SqliteConstructor = new (
  file: string,
  options?: { readonly?: boolean; fileMustExist?: boolean; timeout?: number },
) => SqliteDatabase

const Database = createRequire(import.meta.url)('better-sqlite3') as SqliteConstructor

/**
 * Copies a live database through SQLite's online backup API. The whole file is copied in one
 * step: the step holds one read transaction, so the copy is the database as it stood at one
 * moment, and in WAL mode the server's writers go on meanwhile. Copying in small steps instead
 * would start over after every write another connection makes, possibly forever under load.
 */
export async function snapshotDatabase(source: string, target: string): Promise<void> {
  // Not read-only: a read-only connection leaves -wal and -shm files behind when no server has
  // the database open. Nothing is written through this one.
  const db = new Database(source, { fileMustExist: true, timeout: 5000 })
  try {
    await db.backup(target, { progress: () => 0x7fffffff })
  } finally {
    db.close()
  }
}

export interface DatabaseFacts {
  latestMigration: string
  tables: Record<string, number>
}

/**
 * Checks a database copy and reads what the manifest says of it. The copy is switched out of WAL
 * mode so it is one self-contained file; the app switches it back when it opens it.
 */
export function finishCopy(file: string): DatabaseFacts {
  const db = new Database(file, { fileMustExist: true })
  try {
    db.pragma('journal_mode = DELETE')
    const check = db.pragma('quick_check', { simple: true })
    if (check !== 'ok') throw new BackupError(`The database copy failed its check: ${check}.`)
    return readFacts(db, file)
  } finally {
    db.close()
  }
}

function readFacts(db: SqliteDatabase, file: string): DatabaseFacts {
  const names = db
    .prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%'")
    .all() as { name: string }[]
  if (!names.some((t) => t.name === 'knex_migrations'))
    throw new BackupError(`${file} has no Ringdown migrations, so it is not a Ringdown database.`)
  const latest = db.prepare('select name from knex_migrations order by id desc limit 1').get() as
    { name: string } | undefined
  if (!latest) throw new BackupError(`${file} has had no migrations applied yet.`)
  const tables: Record<string, number> = {}
  for (const { name } of names.sort((a, b) => a.name.localeCompare(b.name))) {
    const row = db.prepare(`select count(*) as n from "${name.replaceAll('"', '""')}"`).get()
    tables[name] = (row as { n: number }).n
  }
  return { latestMigration: latest.name, tables }
}
