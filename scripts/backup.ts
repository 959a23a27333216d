// `npm run backup -- DIR`: the database and the media into a new folder; safe while Ringdown runs.
import { createBackup } from '../server/backup/backup'
import { describeBackup, runCommand } from '../server/backup/cli'

await runCommand('backup', async (dir, config) => {
  const { manifest } = await createBackup({
    databaseFile: config.databaseFile,
    mediaDir: config.mediaDir,
    targetDir: dir,
  })
  return `Backup written to ${dir}: ${describeBackup(manifest)}.`
})
