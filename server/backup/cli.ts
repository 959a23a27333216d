import { resolve } from 'node:path'
import { loadConfig, type Config } from '../config'
import { BackupError, DATABASE_COPY, type BackupManifest } from './manifest'

/**
 * Runs one command of the backup scripts: one folder argument in, one line out. A refusal is
 * one plain sentence on stderr and exit code 1; a missing argument is the usage and code 2.
 */
export async function runCommand(
  command: 'backup' | 'restore',
  task: (dir: string, config: Config) => Promise<string>,
): Promise<void> {
  const args = process.argv.slice(2)
  if (args.length !== 1 || args[0].startsWith('-')) {
    console.error(`Name the backup folder: npm run ${command} -- DIR`)
    process.exitCode = 2
    return
  }
  try {
    // npm runs scripts in the project root; a relative DIR means where npm was started.
    const dir = resolve(process.env.INIT_CWD ?? process.cwd(), args[0])
    console.log(await task(dir, scriptConfig()))
  } catch (err) {
    console.error(sentence(command, err))
    process.exitCode = 1
  }
}

/** DATABASE_FILE and MEDIA_DIR as the server reads them. */
function scriptConfig(): Config {
  // The secret signs nothing here; a placeholder keeps loadConfig from generating one on disk.
  return loadConfig({ ...process.env, JWT_SECRET: process.env.JWT_SECRET || 'unused' })
}

function sentence(command: string, err: unknown): string {
  if (err instanceof BackupError) return err.message
  const first = String((err as Error)?.message ?? err).split('\n')[0]
  return `The ${command} failed: ${first.replace(/\.$/, '')}.`
}

export function describeBackup(manifest: BackupManifest): string {
  const media = manifest.files.filter((f) => f.path !== DATABASE_COPY)
  const bytes = manifest.files.reduce((sum, f) => sum + f.size, 0)
  const answers = manifest.tables.answers ?? 0
  return (
    `${answers} answers, ${media.length} media files, ${(bytes / 1e6).toFixed(1)} MB in all; ` +
    `database at migration ${manifest.latestMigration}`
  )
}
