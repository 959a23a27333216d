import { randomBytes } from 'node:crypto'
import { mkdir, open, readFile, rename, rm, writeFile } from 'node:fs/promises'
import { join, resolve } from 'node:path'
import { CLIP_LIMITS } from '../../shared/schemas/clips'

/** An uploaded file waiting in the temp folder, as the upload middleware hands it on. */
export interface UploadedFile {
  path: string
  /** The name the sender gave; kept in the database only, never used as a path. */
  name: string
  mimeType: string
  size: number
}

export interface MediaFolders {
  incoming: string
  originals: string
  renditions: string
}

export function mediaFolders(mediaDir: string): MediaFolders {
  const root = resolve(mediaDir)
  return {
    incoming: join(root, 'incoming'),
    originals: join(root, 'originals'),
    renditions: join(root, 'renditions'),
  }
}

export type StoredContainer = 'wav' | 'flac'

// Random and nothing else: a name on disk (or in a URL) must not hint at recipe or clip.
const OPAQUE_NAME = /^[0-9a-f]{32}\.(wav|flac)$/

export function opaqueName(ext: StoredContainer): string {
  return `${randomBytes(16).toString('hex')}.${ext}`
}

/** A file still being written: uploads in the incoming folder, new media beside their final name. */
export const PART_NAME = /^[0-9a-f]{32}(\.(wav|flac))?\.part$/
export const isOpaqueName = (name: string) => OPAQUE_NAME.test(name)
const partOf = (path: string) => `${path}.part`

function inside(folder: string, name: string): string {
  if (!OPAQUE_NAME.test(name)) throw new Error(`not a media file name: ${name}`)
  return join(folder, name)
}

export const originalPath = (f: MediaFolders, name: string) => inside(f.originals, name)
export const renditionPath = (f: MediaFolders, name: string) => inside(f.renditions, name)

/** Why a sender's file name is refused, or null when it is acceptable. */
export function fileNameProblem(name: string): string | null {
  if (!name.trim()) return 'The file has no name'
  if (name.length > CLIP_LIMITS.fileNameMax)
    return `The file name is longer than ${CLIP_LIMITS.fileNameMax} characters`
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(name)) return 'The file name holds control characters'
  if (/[/\\]/.test(name) || name === '..' || name === '.')
    return 'The file name holds a folder path; send the bare file name'
  return null
}

// Browsers label WAV in several ways and often send no type (or a generic one) for FLAC.
const AUDIO_TYPES = new Set([
  'audio/wav',
  'audio/wave',
  'audio/x-wav',
  'audio/vnd.wave',
  'audio/x-pn-wav',
  'audio/flac',
  'audio/x-flac',
  'application/octet-stream',
  '',
])

/** Why a declared content type is refused; the bytes are checked separately in any case. */
export function contentTypeProblem(mimeType: string): string | null {
  const type = mimeType.split(';')[0].trim().toLowerCase()
  if (AUDIO_TYPES.has(type)) return null
  return `Files sent as ${type} are not accepted; send WAV or FLAC recordings`
}

/** Flushes a file's bytes to the disk, so a power cut after what follows cannot empty it. */
async function syncFile(path: string): Promise<void> {
  const file = await open(path, 'r+')
  try {
    await file.sync()
  } finally {
    await file.close()
  }
}

/** Flushes a folder's entries (a rename into it); not every system lets a folder be opened. */
async function syncFolder(dir: string): Promise<void> {
  try {
    const folder = await open(dir, 'r')
    try {
      await folder.sync()
    } finally {
      await folder.close()
    }
  } catch {
    // The rename stands; only its survival of a power cut is less certain on such a system.
  }
}

/**
 * Puts a complete file under its final name: flushed first, then renamed, which replaces the
 * name in one step (POSIX rename), so a final name never holds a part of a file, whatever stops
 * the process. The rows that name the file are written after this returns.
 */
async function placeFile(partPath: string, finalPath: string, dir: string): Promise<void> {
  await syncFile(partPath)
  await rename(partPath, finalPath)
  await syncFolder(dir)
}

/** Moves a checked upload out of the temp folder; same disk, so nothing is copied. */
export async function keepOriginal(
  folders: MediaFolders,
  tempPath: string,
  container: StoredContainer,
): Promise<string> {
  await mkdir(folders.originals, { recursive: true })
  const name = opaqueName(container)
  await placeFile(tempPath, originalPath(folders, name), folders.originals)
  return name
}

/** Writes original bytes made on the server (the demo seed) into the originals. */
export async function writeOriginal(
  folders: MediaFolders,
  bytes: Uint8Array,
  container: StoredContainer,
): Promise<string> {
  await mkdir(folders.originals, { recursive: true })
  const name = opaqueName(container)
  const path = originalPath(folders, name)
  try {
    await writeFile(partOf(path), bytes, { flag: 'wx' })
    await placeFile(partOf(path), path, folders.originals)
  } catch (err) {
    await rm(partOf(path), { force: true })
    throw err
  }
  return name
}

/**
 * A new rendition under a fresh name, written by `write`, which must create the file at the path
 * it is given. That path is a part file beside the final name; only a complete file is renamed
 * into place, and a part is removed when `write` fails (a full disk, say). Returns the name.
 */
export async function writeRenditionFile(
  folders: MediaFolders,
  write: (path: string) => Promise<void>,
): Promise<string> {
  await mkdir(folders.renditions, { recursive: true })
  const name = opaqueName('wav')
  const path = renditionPath(folders, name)
  try {
    await write(partOf(path))
    await placeFile(partOf(path), path, folders.renditions)
  } catch (err) {
    await rm(partOf(path), { force: true })
    throw err
  }
  return name
}

export async function readOriginal(folders: MediaFolders, name: string): Promise<Uint8Array> {
  const buffer = await readFile(originalPath(folders, name))
  return new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength)
}

export async function removeMedia(paths: readonly string[]): Promise<void> {
  await Promise.all(paths.map((p) => rm(p, { force: true })))
}
