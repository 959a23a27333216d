// `npm run restore -- DIR`: a backup into the configured DATABASE_FILE and MEDIA_DIR, which
// must be empty; start Ringdown as usual afterwards.
import { restoreBackup } from '../server/backup/restore'
import { describeBackup, runCommand } from '../server/backup/cli'

await runCommand('restore', async (dir, config) => {
  const { manifest, databaseFile, mediaDir } = await restoreBackup({
    backupDir: dir,
    databaseFile: config.databaseFile,
    mediaDir: config.mediaDir,
  })
  return (
    `Restored the backup of ${manifest.createdAt} into ${databaseFile} and ${mediaDir}: ` +
    `${describeBackup(manifest)}.`
  )
})
