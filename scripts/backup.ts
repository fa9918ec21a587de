/**
 * npm run backup [-- INTO_DIR]: a consistent online backup of the database the environment names
 * (by default npm start's) and its upload directory, into INTO_DIR/ferrolane-<UTC time>/
 * (default: BACKUP_DIR, else backups/). The server keeps running meanwhile.
 */
import { loadConfig } from '../server/config'
import { BackupProblem, takeBackup } from './lib/backup'

const into = process.argv[2] || process.env.BACKUP_DIR || 'backups'
takeBackup(loadConfig(), into)
  .then((dir) => console.log(`[backup] written to ${dir}\n[backup] check it anywhere with: (cd ${dir} && sha256sum -c SHA256SUMS)`))
  .catch((err: unknown) => {
    console.error(
      `[backup] failed: ` +
        `${err instanceof BackupProblem || (err instanceof Error && err.message.startsWith('Configuration:')) ? err.message : String(err)}`,
    )
    process.exitCode = 1
  })
