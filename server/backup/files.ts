import { createHash, randomBytes } from 'node:crypto'
import { createReadStream, createWriteStream } from 'node:fs'
import { lstat, mkdir, readdir, rm } from 'node:fs/promises'
import { basename, dirname, join, relative, sep } from 'node:path'
import { Transform } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { BackupError } from './manifest'

export interface Hashed {
  size: number
  sha256: string
}

export function errno(err: unknown): string | undefined {
  return (err as NodeJS.ErrnoException | undefined)?.code
}

export async function hashFile(path: string): Promise<Hashed> {
  const hash = createHash('sha256')
  let size = 0
  for await (const chunk of createReadStream(path) as AsyncIterable<Buffer>) {
    hash.update(chunk)
    size += chunk.length
  }
  return { size, sha256: hash.digest('hex') }
}

/**
 * Copies a file and hashes the bytes as they pass, so the checksum describes what was written
 * and a media file is read once. `wx`: a copy never replaces a file that is already there.
 */
export async function copyWithHash(from: string, to: string): Promise<Hashed> {
  await mkdir(dirname(to), { recursive: true })
  const hash = createHash('sha256')
  let size = 0
  const tap = new Transform({
    transform(chunk: Buffer, _enc, done) {
      hash.update(chunk)
      size += chunk.length
      done(null, chunk)
    },
  })
  await pipeline(createReadStream(from), tap, createWriteStream(to, { flags: 'wx' }))
  return { size, sha256: hash.digest('hex') }
}

/** Every regular file below `root`, as paths relative to it with `/` between parts, sorted. */
export async function listFiles(root: string): Promise<string[]> {
  const found: string[] = []
  async function walk(dir: string) {
    let entries
    try {
      entries = await readdir(dir, { withFileTypes: true })
    } catch (err) {
      if (errno(err) === 'ENOENT') return
      throw err
    }
    for (const entry of entries) {
      const path = join(dir, entry.name)
      if (entry.isDirectory()) await walk(path)
      // Links and sockets are not media the app wrote; a copy of them would mean nothing.
      else if (entry.isFile()) found.push(relative(root, path).split(sep).join('/'))
    }
  }
  await walk(root)
  return found.sort()
}

export type PathState = 'absent' | 'empty' | 'full' | 'file'

/** What is at `path`: nothing, an empty folder, a folder with something in it, or a file. */
export async function folderState(path: string): Promise<PathState> {
  try {
    const stat = await lstat(path)
    if (!stat.isDirectory()) return 'file'
    return (await readdir(path)).length === 0 ? 'empty' : 'full'
  } catch (err) {
    if (errno(err) === 'ENOENT') return 'absent'
    throw err
  }
}

/** Size of a file, or null when there is none; a folder in its place is refused. */
export async function fileSize(path: string): Promise<number | null> {
  try {
    const stat = await lstat(path)
    if (stat.isDirectory()) throw new BackupError(`${path} is a folder, not a database file.`)
    return stat.size
  } catch (err) {
    if (errno(err) === 'ENOENT') return null
    throw err
  }
}

/** A fresh name beside `path`, in the same folder so the final rename never crosses disks. */
export function siblingName(path: string, purpose: string): string {
  return join(dirname(path), `.${basename(path)}.${purpose}-${randomBytes(4).toString('hex')}`)
}

export async function removeQuietly(path: string): Promise<void> {
  await rm(path, { recursive: true, force: true }).catch(() => {})
}

const WHY: Record<string, string> = {
  EACCES: 'permission denied',
  EPERM: 'permission denied',
  EROFS: 'the file system is read-only',
  ENOTDIR: 'part of the path is a file, not a folder',
  ENOSPC: 'the disk is full',
}

/** Turns a file-system error on `path` into one sentence, or null when it is not such an error. */
export function cannotWrite(path: string, err: unknown): BackupError | null {
  const code = errno(err)
  if (!code || !(code in WHY)) return null
  return new BackupError(`${path} cannot be written: ${WHY[code]}.`)
}
