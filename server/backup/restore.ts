import { link, mkdir, readdir, rename } from 'node:fs/promises'
import { dirname, join, resolve } from 'node:path'
import { migrationsDir } from '../db/knex'
import {
  copyWithHash,
  errno,
  fileSize,
  folderState,
  hashFile,
  removeQuietly,
  siblingName,
  type Hashed,
  type PathState,
} from './files'
import {
  BackupError,
  DATABASE_COPY,
  readManifest,
  type BackupFile,
  type BackupManifest,
} from './manifest'

export interface RestoreOptions {
  backupDir: string
  /** Must not exist yet, or be an empty file. */
  databaseFile: string
  /** Must not exist yet, or be an empty folder. */
  mediaDir: string
  /** Migration names this Ringdown knows; read from the migrations folder by default. */
  knownMigrations?: string[]
}

export interface RestoreResult {
  databaseFile: string
  mediaDir: string
  manifest: BackupManifest
}

/**
 * Puts a backup back into an empty place. Every file is checked against the manifest before
 * anything is copied, and again as it is copied; the copies are made beside their targets and
 * renamed into place last, the database after the media, so a failure leaves nothing behind.
 */
export async function restoreBackup(options: RestoreOptions): Promise<RestoreResult> {
  if (options.databaseFile === ':memory:')
    throw new BackupError(
      'A backup cannot be restored into an in-memory database; set DATABASE_FILE.',
    )
  const dir = resolve(options.backupDir)
  const databaseFile = resolve(options.databaseFile)
  const mediaDir = resolve(options.mediaDir)
  const manifest = await readManifest(dir)
  const known = options.knownMigrations ?? (await readdir(migrationsDir))
  if (!known.includes(manifest.latestMigration))
    throw new BackupError(
      `The backup was made by a newer Ringdown (${manifest.ringdownVersion}, migration ${manifest.latestMigration}); update Ringdown first.`,
    )
  const mediaBefore = await checkVacant(databaseFile, mediaDir)
  for (const file of manifest.files) checkSame(file, await readBackupFile(dir, file))

  const databaseWork = siblingName(databaseFile, 'restoring')
  const mediaWork = siblingName(mediaDir, 'restoring')
  let mediaPlaced = false
  try {
    await mkdir(dirname(databaseFile), { recursive: true })
    await mkdir(mediaWork, { recursive: true })
    for (const file of manifest.files) {
      const [, ...inMedia] = file.path.split('/')
      const to = file.path === DATABASE_COPY ? databaseWork : join(mediaWork, ...inMedia)
      checkSame(file, await copyWithHash(join(dir, ...file.path.split('/')), to))
    }
    // Looked at again: a server may have been started on the empty place meanwhile.
    await checkVacant(databaseFile, mediaDir)
    await placeMedia(mediaWork, mediaDir)
    mediaPlaced = true
    await placeDatabase(databaseWork, databaseFile)
    return { databaseFile, mediaDir, manifest }
  } catch (err) {
    if (mediaPlaced) {
      await removeQuietly(mediaDir)
      if (mediaBefore === 'empty') await mkdir(mediaDir).catch(() => {})
    }
    throw err
  } finally {
    await removeQuietly(databaseWork)
    await removeQuietly(mediaWork)
  }
}

/** Refuses unless there is no database (or an empty file) and no media (or an empty folder). */
async function checkVacant(databaseFile: string, mediaDir: string): Promise<PathState> {
  const size = await fileSize(databaseFile)
  if (size)
    throw new BackupError(
      `The database ${databaseFile} already exists; restore only where there is no database yet.`,
    )
  // A log left by an earlier database would be replayed into the restored one.
  for (const beside of ['-wal', '-journal'])
    if (await fileSize(databaseFile + beside))
      throw new BackupError(
        `${databaseFile}${beside} is left from an earlier database; remove it before restoring.`,
      )
  const media = await folderState(mediaDir)
  if (media === 'file')
    throw new BackupError(`The media folder ${mediaDir} is a file; restore needs a folder there.`)
  if (media === 'full')
    throw new BackupError(
      `The media folder ${mediaDir} is not empty; restore only into an empty or absent folder.`,
    )
  return media
}

async function readBackupFile(dir: string, file: BackupFile): Promise<Hashed> {
  try {
    return await hashFile(join(dir, ...file.path.split('/')))
  } catch (err) {
    if (errno(err) === 'ENOENT' || errno(err) === 'EISDIR')
      throw new BackupError(`The backup at ${dir} is missing ${file.path}; nothing was restored.`)
    throw err
  }
}

function checkSame(file: BackupFile, found: Hashed) {
  if (found.size !== file.size || found.sha256 !== file.sha256)
    throw new BackupError(
      `The backup file ${file.path} does not match its checksum, so the backup is damaged; nothing was restored.`,
    )
}

async function placeMedia(work: string, mediaDir: string) {
  try {
    // On POSIX a rename replaces an empty folder and fails on any other.
    await rename(work, mediaDir)
  } catch (err) {
    if (errno(err) === 'ENOTEMPTY' || errno(err) === 'EEXIST')
      throw new BackupError(
        `The media folder ${mediaDir} filled up while restoring; nothing was restored.`,
      )
    throw err
  }
}

async function placeDatabase(work: string, databaseFile: string) {
  try {
    // A hard link never replaces a file that appeared meanwhile; an empty one is renamed over.
    if ((await fileSize(databaseFile)) === null) await link(work, databaseFile)
    else await rename(work, databaseFile)
  } catch (err) {
    if (errno(err) === 'EEXIST')
      throw new BackupError(
        `The database ${databaseFile} appeared while restoring; nothing was restored.`,
      )
    throw err
  }
}
