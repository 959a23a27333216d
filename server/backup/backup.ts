import { access, constants, mkdir, rename, writeFile } from 'node:fs/promises'
import { basename, dirname, join, resolve } from 'node:path'
import {
  cannotWrite,
  copyWithHash,
  errno,
  fileSize,
  folderState,
  hashFile,
  listFiles,
  removeQuietly,
  siblingName,
} from './files'
import {
  BackupError,
  DATABASE_COPY,
  MANIFEST_FILE,
  MEDIA_PARTS,
  ringdownVersion,
  type BackupFile,
  type BackupManifest,
} from './manifest'
import { finishCopy, snapshotDatabase } from './sqlite'
import { PART_NAME } from '../clips/storage'

export interface BackupOptions {
  databaseFile: string
  mediaDir: string
  /** Must not exist yet, or be an empty folder. */
  targetDir: string
  now?: Date
}

export interface BackupResult {
  dir: string
  manifest: BackupManifest
}

/**
 * Writes a backup folder: a consistent copy of the database (taken while the server may be
 * running), the originals and renditions, and a manifest with a checksum of every file. It is
 * assembled beside the target and renamed into place last, so a failure leaves nothing behind.
 */
export async function createBackup(options: BackupOptions): Promise<BackupResult> {
  if (options.databaseFile === ':memory:')
    throw new BackupError('An in-memory database cannot be backed up; set DATABASE_FILE.')
  const target = resolve(options.targetDir)
  const databaseFile = resolve(options.databaseFile)
  const mediaDir = resolve(options.mediaDir)
  if (!(await fileSize(databaseFile)))
    throw new BackupError(`There is no database at ${databaseFile} to back up.`)
  await checkTarget(target)

  const work = siblingName(target, 'partial')
  try {
    await mkdir(dirname(target), { recursive: true })
    await mkdir(work)
  } catch (err) {
    throw cannotWrite(target, err) ?? err
  }
  try {
    await snapshotDatabase(databaseFile, join(work, DATABASE_COPY))
    const facts = finishCopy(join(work, DATABASE_COPY))
    const files: BackupFile[] = [
      { path: DATABASE_COPY, ...(await hashFile(join(work, DATABASE_COPY))) },
    ]
    // After the database: a clip added meanwhile only leaves an unused file in the backup.
    for (const part of MEDIA_PARTS) {
      for (const name of await listFiles(join(mediaDir, part))) {
        // Still being written: it gets its final name when complete, or the sweep removes it.
        if (PART_NAME.test(basename(name))) continue
        const path = `media/${part}/${name}`
        const copied = await copyWithHash(join(mediaDir, part, name), join(work, path)).catch(
          (err: unknown) => {
            // Removed since the listing (a clip deleted, a set re-levelled): nothing left to copy.
            if (errno(err) === 'ENOENT') return null
            throw err
          },
        )
        if (copied) files.push({ path, ...copied })
      }
    }
    const manifest: BackupManifest = {
      kind: 'ringdown-backup',
      formatVersion: 1,
      createdAt: (options.now ?? new Date()).toISOString(),
      ringdownVersion: await ringdownVersion(),
      ...facts,
      files,
    }
    await writeFile(join(work, MANIFEST_FILE), `${JSON.stringify(manifest, null, 2)}\n`, {
      flag: 'wx',
    })
    await placeBackup(work, target)
    return { dir: target, manifest }
  } catch (err) {
    await removeQuietly(work)
    throw err
  }
}

async function checkTarget(target: string) {
  try {
    const state = await folderState(target)
    if (state === 'file') throw new BackupError(`${target} is a file; name a new or empty folder.`)
    if (state === 'full')
      throw new BackupError(`${target} is not empty; name a new or empty folder for the backup.`)
    if (state === 'empty') await access(target, constants.W_OK)
    const parent = await folderState(dirname(target))
    if (parent === 'file') throw Object.assign(new Error('not a folder'), { code: 'ENOTDIR' })
    // A missing parent is made when the backup starts.
    if (parent !== 'absent') await access(dirname(target), constants.W_OK)
  } catch (err) {
    throw cannotWrite(target, err) ?? err
  }
}

/** Renames the finished folder onto the target; an empty folder there is replaced, never more. */
async function placeBackup(work: string, target: string) {
  try {
    await rename(work, target)
  } catch (err) {
    const code = errno(err)
    if (code === 'ENOTEMPTY' || code === 'EEXIST')
      throw new BackupError(`${target} filled up while the backup ran; nothing was written there.`)
    throw err
  }
}
