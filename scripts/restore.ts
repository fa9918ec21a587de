/**
 * npm run restore -- DIR [--yes]: replaces the database's tables and the upload directory with
 * the backup in DIR, after checking every file against the manifest. Stop every app node first.
 * It asks for the database's name to confirm; --yes skips the question (scripts, the drill).
 */
import { createInterface } from 'node:readline/promises'
import { loadConfig } from '../server/config'
import { BackupProblem, restoreBackup, verifyBackup } from './lib/backup'

async function main(): Promise<void> {
  const args = process.argv.slice(2)
  const dir = args.find((a) => !a.startsWith('--'))
  if (!dir) throw new BackupProblem('say which backup: npm run restore -- backups/ferrolane-<time>')
  const config = loadConfig()
  const manifest = await verifyBackup(dir)
  console.log(
    `[restore] ${dir}: taken ${manifest.createdAt} from ${manifest.database.name}, ${Object.keys(manifest.tables).length} ` +
      `tables, ${manifest.files.length - 1} uploaded files; every checksum matches`,
  )
  if (!args.includes('--yes')) {
    if (!process.stdin.isTTY) throw new BackupProblem('this replaces the whole database: run it in a terminal, or add --yes')
    const rl = createInterface({ input: process.stdin, output: process.stdout })
    const answer = await rl.question(
      `[restore] This REPLACES every table in ${config.db.name} and the files in ${config.uploadDir}. Type the database name to go on: `,
    )
    rl.close()
    if (answer.trim() !== config.db.name) throw new BackupProblem('not confirmed; nothing changed')
  }
  const r = await restoreBackup(config, dir)
  if (r.previousUploads) console.log(`[restore] the upload directory as it was is kept in ${r.previousUploads}`)
  if (r.differing.length) {
    console.warn(
      `[restore] restored, but these tables differ from the figures taken at backup time: ${r.differing.join(', ')}.\n          ` +
        `Someone wrote to them while the backup ran (the dump itself is one consistent moment); check before reopening.`,
    )
  } else console.log("[restore] restored; every table matches the backup's row counts and checksums")
  console.log('[restore] now run the migrations (they apply whatever this version adds), then start the app nodes')
}

main().catch((err: unknown) => {
  console.error(
    `[restore] refused: ` +
      `${err instanceof BackupProblem || (err instanceof Error && err.message.startsWith('Configuration:')) ? err.message : String(err)}`,
  )
  process.exitCode = 1
})
