/**
 * Online backup and restore of one Ferrolane site: the database (mariadb-dump in a single
 * consistent transaction, with triggers and routines) and the upload directory, into one folder
 * with a manifest and checksums. Shared by `npm run backup`, `npm run restore` and the API test.
 */
import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { createReadStream, createWriteStream, existsSync } from 'node:fs'
import { cp, mkdir, mkdtemp, readFile, readdir, rename, rm, stat, writeFile } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { pipeline } from 'node:stream/promises'
import { QueryTypes, type Sequelize } from 'sequelize'
import type { Config } from '../../server/config'
import { createSequelize } from '../../server/db'
import { migrations } from '../../server/migrations/index'

export const BACKUP_FORMAT = 'ferrolane-backup/1'

export interface Manifest {
  format: typeof BACKUP_FORMAT
  createdAt: string
  database: { name: string; serverVersion: string }
  migrations: string[]
  /** Taken right after the dump; equal to it unless someone wrote in between. */
  tables: Record<string, { rows: number; checksum: string | null }>
  files: { path: string; bytes: number; sha256: string }[]
}

/** A refusal the operator can act on: printed as it is, nothing changed. */
export class BackupProblem extends Error {}

function run(cmd: string, args: string[], io: { stdin?: string; stdout?: string } = {}): Promise<void> {
  const child = spawn(cmd, args, { stdio: [io.stdin ? 'pipe' : 'ignore', io.stdout ? 'pipe' : 'ignore', 'pipe'] })
  let err = ''
  child.stderr!.on('data', (d: Buffer) => {
    err += d.toString()
  })
  const exited = new Promise<void>((resolve, reject) => {
    child.on('error', (e) =>
      reject(new BackupProblem(`${cmd} could not be run (${e.message}): install the MariaDB client (apt-get install mariadb-client)`)),
    )
    child.on('close', (code) =>
      code === 0 ? resolve() : reject(new BackupProblem(`${cmd} failed (exit ${code}): ${err.trim().slice(0, 500)}`)),
    )
  })
  // The dump is complete only once the file has it all, not when the process exits.
  const streams = [
    io.stdout ? pipeline(child.stdout!, createWriteStream(io.stdout, { mode: 0o600 })) : null,
    io.stdin ? pipeline(createReadStream(io.stdin), child.stdin!) : null,
  ]
  return Promise.all([exited, ...streams]).then(() => undefined)
}

/** The password goes in a private option file, never on a command line that `ps` shows. */
async function withOptionFile<T>(config: Config, use: (args: string[]) => Promise<T>): Promise<T> {
  const dir = await mkdtemp(path.join(tmpdir(), 'ferrolane-db-'))
  const file = path.join(dir, 'client.cnf')
  const where = config.db.socket ? `socket=${config.db.socket}` : `host=${config.db.host}\nport=${config.db.port}\nprotocol=tcp`
  await writeFile(file, `[client]\nuser=${config.db.user}\npassword=${config.db.password}\n${where}\n`, { mode: 0o600 })
  try {
    return await use([`--defaults-extra-file=${file}`])
  } finally {
    await rm(dir, { recursive: true, force: true })
  }
}

export async function sha256File(file: string): Promise<string> {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer)
  return hash.digest('hex')
}

async function listFiles(root: string, under = ''): Promise<string[]> {
  if (!existsSync(path.join(root, under))) return []
  const out: string[] = []
  for (const e of await readdir(path.join(root, under), { withFileTypes: true })) {
    const rel = path.posix.join(under, e.name)
    if (e.isDirectory()) out.push(...(await listFiles(root, rel)))
    else if (e.isFile()) out.push(rel)
  }
  return out.sort()
}

/** Row counts and CHECKSUM TABLE of every base table, by name. */
export async function tableChecksums(sequelize: Sequelize): Promise<Manifest['tables']> {
  const tables = await sequelize.query<{ name: string }>(
    `SELECT table_name AS name FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' ` +
      `ORDER BY table_name`,
    { type: QueryTypes.SELECT },
  )
  const out: Manifest['tables'] = {}
  for (const { name } of tables) {
    const [c] = await sequelize.query<{ Checksum: string | number | null }>(`CHECKSUM TABLE \`${name}\``, { type: QueryTypes.SELECT })
    const [r] = await sequelize.query<{ n: number }>(`SELECT COUNT(*) AS n FROM \`${name}\``, { type: QueryTypes.SELECT })
    out[name] = { rows: Number(r!.n), checksum: c?.Checksum == null ? null : String(c.Checksum) }
  }
  return out
}

const stamp = (d: Date) =>
  d
    .toISOString()
    .replace(/[-:]/g, '')
    .replace(/\.\d+Z$/, 'Z')

/** Takes a backup into a new folder under `intoDir` and returns its path. */
export async function takeBackup(config: Config, intoDir: string): Promise<string> {
  const now = new Date()
  const dir = path.resolve(intoDir, `ferrolane-${stamp(now)}`)
  if (existsSync(dir)) throw new BackupProblem(`${dir} already exists`)
  await mkdir(dir, { recursive: true, mode: 0o700 })
  const sequelize = createSequelize(config)
  try {
    const [v] = await sequelize.query<{ v: string }>('SELECT VERSION() AS v', { type: QueryTypes.SELECT }).catch(() => {
      throw new BackupProblem(
        `cannot reach the database ${config.db.name} (${config.db.socket ?? `${config.db.host}:${config.db.port}`}): is MariaDB ` +
          `running, and are DB_* set as the server has them?`,
      )
    })
    // One consistent snapshot without locking writers out (InnoDB); triggers (the audit trail's
    // append-only guard) and routines come with it; binary columns as hex so nothing is mangled.
    await withOptionFile(config, (auth) =>
      run(
        'mariadb-dump',
        [
          ...auth,
          '--single-transaction',
          '--routines',
          '--triggers',
          '--hex-blob',
          '--default-character-set=utf8mb4',
          '--skip-dump-date',
          config.db.name,
        ],
        { stdout: path.join(dir, 'database.sql') },
      ),
    )
    const tables = await tableChecksums(sequelize)
    const applied = await sequelize.query<{ name: string }>('SELECT name FROM schema_migrations ORDER BY name', { type: QueryTypes.SELECT })
    // Files after the dump: every document a dumped row names was written before its row.
    if (existsSync(config.uploadDir)) await cp(config.uploadDir, path.join(dir, 'uploads'), { recursive: true })
    const files: Manifest['files'] = []
    for (const rel of ['database.sql', ...(await listFiles(dir, 'uploads'))]) {
      const full = path.join(dir, rel)
      files.push({ path: rel, bytes: (await stat(full)).size, sha256: await sha256File(full) })
    }
    const manifest: Manifest = {
      format: BACKUP_FORMAT,
      createdAt: now.toISOString(),
      database: { name: config.db.name, serverVersion: v!.v },
      migrations: applied.map((m) => m.name),
      tables,
      files,
    }
    await writeFile(path.join(dir, 'manifest.json'), JSON.stringify(manifest, null, 2) + '\n', { mode: 0o600 })
    // `sha256sum -c SHA256SUMS` checks the folder without Ferrolane.
    const sums = [...files, { path: 'manifest.json', sha256: await sha256File(path.join(dir, 'manifest.json')) }].map(
      (f) => `${f.sha256}  ${f.path}`,
    )
    await writeFile(path.join(dir, 'SHA256SUMS'), sums.join('\n') + '\n', { mode: 0o600 })
    return dir
  } catch (err) {
    await rm(dir, { recursive: true, force: true })
    throw err
  } finally {
    await sequelize.close()
  }
}

/** Reads and checks a backup folder; throws BackupProblem naming the first thing wrong. */
export async function verifyBackup(dir: string): Promise<Manifest> {
  const at = (f: string) => path.join(dir, f)
  if (!existsSync(at('manifest.json')) || !existsSync(at('SHA256SUMS')))
    throw new BackupProblem(`${dir} is not a Ferrolane backup: manifest.json or SHA256SUMS is missing`)
  const sums = new Map(
    (await readFile(at('SHA256SUMS'), 'utf8'))
      .split('\n')
      .filter(Boolean)
      .map((l) => [l.slice(66), l.slice(0, 64)] as const),
  )
  if (sums.get('manifest.json') !== (await sha256File(at('manifest.json'))))
    throw new BackupProblem('manifest.json does not match its checksum in SHA256SUMS: the backup is damaged')
  let manifest: Manifest
  try {
    manifest = JSON.parse(await readFile(at('manifest.json'), 'utf8')) as Manifest
  } catch {
    throw new BackupProblem('manifest.json is not readable JSON: the backup is damaged')
  }
  if (manifest.format !== BACKUP_FORMAT)
    throw new BackupProblem(`this backup's format is ${String(manifest.format)}; this Ferrolane reads ${BACKUP_FORMAT}`)
  if (!manifest.files.some((f) => f.path === 'database.sql')) throw new BackupProblem('the manifest lists no database.sql')
  for (const f of manifest.files) {
    const full = path.join(dir, f.path)
    if (path.relative(dir, full).startsWith('..')) throw new BackupProblem(`the manifest names a file outside the backup: ${f.path}`)
    if (!existsSync(full)) throw new BackupProblem(`${f.path} is missing from the backup`)
    if ((await stat(full)).size !== f.bytes || (await sha256File(full)) !== f.sha256)
      throw new BackupProblem(`${f.path} does not match its checksum: the backup is damaged`)
  }
  // A backup from a newer Ferrolane has tables this code does not know how to use.
  const known = new Set(migrations.map((m) => m.name))
  const unknown = manifest.migrations.filter((m) => !known.has(m))
  if (unknown.length)
    throw new BackupProblem(
      `this backup was taken by a newer Ferrolane (migrations ${unknown.join(', ')} are unknown here): restore it with that version`,
    )
  return manifest
}

export interface RestoreResult {
  manifest: Manifest
  differing: string[]
  previousUploads: string | null
}

/**
 * Replaces the database's tables and the upload directory with the backup's. The running app
 * must be stopped first. The old upload directory is kept beside the new one, renamed.
 */
export async function restoreBackup(config: Config, dir: string): Promise<RestoreResult> {
  const manifest = await verifyBackup(dir)
  const sequelize = createSequelize(config)
  try {
    await sequelize.query('SELECT 1', { type: QueryTypes.SELECT }).catch(() => {
      throw new BackupProblem(`cannot reach the database ${config.db.name}: is MariaDB running, and are DB_* set as the server has them?`)
    })
    // Tables a later migration added would otherwise survive beside the restored ones.
    await sequelize.transaction(async (transaction) => {
      await sequelize.query('SET FOREIGN_KEY_CHECKS = 0', { type: QueryTypes.RAW, transaction })
      const objects = await sequelize.query<{ name: string; kind: string }>(
        `SELECT table_name AS name, table_type AS kind FROM information_schema.tables WHERE table_schema = DATABASE()`,
        { type: QueryTypes.SELECT, transaction },
      )
      // DROP TABLE takes the audit trail's triggers with it; the dump recreates them after its rows.
      for (const o of objects)
        await sequelize.query(`DROP ${o.kind === 'VIEW' ? 'VIEW' : 'TABLE'} IF EXISTS \`${o.name}\``, { type: QueryTypes.RAW, transaction })
      await sequelize.query('SET FOREIGN_KEY_CHECKS = 1', { type: QueryTypes.RAW, transaction })
    })
    await withOptionFile(config, (auth) =>
      run('mariadb', [...auth, '--default-character-set=utf8mb4', config.db.name], { stdin: path.join(dir, 'database.sql') }),
    )
    let previousUploads: string | null = null
    if (existsSync(config.uploadDir)) {
      previousUploads = `${config.uploadDir}.before-restore-${stamp(new Date())}`
      await rename(config.uploadDir, previousUploads)
    }
    if (existsSync(path.join(dir, 'uploads'))) await cp(path.join(dir, 'uploads'), config.uploadDir, { recursive: true })
    else await mkdir(config.uploadDir, { recursive: true })
    const now = await tableChecksums(sequelize)
    const names = new Set([...Object.keys(now), ...Object.keys(manifest.tables)])
    const differing = [...names].filter((n) => JSON.stringify(now[n]) !== JSON.stringify(manifest.tables[n])).sort()
    return { manifest, differing, previousUploads }
  } finally {
    await sequelize.close()
  }
}
