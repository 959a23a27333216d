import { readFile } from 'node:fs/promises'
import { join } from 'node:path'
import { z } from 'zod'

/** A refusal or failure the operator can act on; its message is one plain sentence. */
export class BackupError extends Error {}

export const MANIFEST_FILE = 'manifest.json'
/** The database copy's name inside a backup folder. */
export const DATABASE_COPY = 'database.sqlite'
/** The media subfolders a backup carries; incoming/ holds only uploads in flight. */
export const MEDIA_PARTS = ['originals', 'renditions'] as const

const sha256 = z.string().regex(/^[0-9a-f]{64}$/)

// A path inside the backup: the database copy, or a plain file name under one media part.
// Nothing else is accepted, so a doctored manifest cannot make a restore write elsewhere.
const safeSegment = (s: string) => s !== '' && s !== '.' && s !== '..' && !/[\\\0]/.test(s)
function isBackupPath(path: string): boolean {
  if (path === DATABASE_COPY) return true
  const [top, part, ...rest] = path.split('/')
  return (
    top === 'media' &&
    (MEDIA_PARTS as readonly string[]).includes(part) &&
    rest.length > 0 &&
    rest.every(safeSegment)
  )
}

const manifestSchema = z.strictObject({
  kind: z.literal('ringdown-backup'),
  formatVersion: z.literal(1),
  createdAt: z.iso.datetime(),
  ringdownVersion: z.string(),
  latestMigration: z.string(),
  tables: z.record(z.string(), z.number().int().nonnegative()),
  files: z
    .array(
      z.strictObject({
        path: z.string().refine(isBackupPath, 'not a path a backup may hold'),
        size: z.number().int().nonnegative(),
        sha256,
      }),
    )
    .refine((files) => files.some((f) => f.path === DATABASE_COPY), 'no database copy listed')
    .refine((files) => new Set(files.map((f) => f.path)).size === files.length, 'a path twice'),
})

export type BackupManifest = z.infer<typeof manifestSchema>
export type BackupFile = BackupManifest['files'][number]

export async function readManifest(backupDir: string): Promise<BackupManifest> {
  const file = join(backupDir, MANIFEST_FILE)
  let text: string
  try {
    text = await readFile(file, 'utf8')
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT')
      throw new BackupError(`There is no backup at ${backupDir}: ${MANIFEST_FILE} is missing.`)
    throw err
  }
  let json: unknown
  try {
    json = JSON.parse(text)
  } catch {
    throw new BackupError(`The backup manifest ${file} is not valid JSON.`)
  }
  const parsed = manifestSchema.safeParse(json)
  if (!parsed.success) {
    const issue = parsed.error.issues[0]
    const where = issue.path.length ? ` at ${issue.path.join('.')}` : ''
    throw new BackupError(`The backup manifest ${file} is not one Ringdown wrote${where}.`)
  }
  return parsed.data
}

const versionFile = new URL('../../package.json', import.meta.url)

export async function ringdownVersion(): Promise<string> {
  const pkg = JSON.parse(await readFile(versionFile, 'utf8')) as { version?: string }
  return pkg.version ?? 'unknown'
}
