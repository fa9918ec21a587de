/**
 * A private MariaDB server for one purpose (the app, the tests, the bench): its own data
 * directory inside the repository, its own port on loopback, never the system's 3306.
 */
import { spawn, execFileSync, type ChildProcess } from 'node:child_process'
import { existsSync, mkdirSync, readFileSync, renameSync, rmSync } from 'node:fs'
import { createHash } from 'node:crypto'
import { tmpdir } from 'node:os'
import path from 'node:path'
import mariadb from 'mariadb'

export interface MariaDbOptions {
  dataDir: string
  port: number
  /** Log lines are prefixed with this so a reader knows which instance spoke. */
  label: string
  /**
   * 'full' (the default, used by npm start): InnoDB flushes its log at every commit
   * (innodb_flush_log_at_trx_commit=1), so a power cut loses no committed record.
   * 'relaxed' (tests, bench only): flushed about once a second (=2); a crash of the machine may
   * lose the last second, which a throw-away database can afford for the speed.
   */
  durability?: 'full' | 'relaxed'
  /** More server options (a Galera node's wsrep settings); appended after the defaults. */
  extraArgs?: string[]
  /** How long to wait for the server to answer; a node that joins by a full state transfer takes longer. */
  readyTimeoutMs?: number
  /** Runs after the data directory is initialised and before the server starts (ownership for a Galera joiner). */
  beforeStart?: () => void
}

export interface MariaDbHandle {
  socket: string
  port: number
  stop(): Promise<void>
}

/** Unix sockets are limited to ~107 bytes; a deep checkout gets a short path under tmp. */
function socketPath(dataDir: string): string {
  const inside = path.join(dataDir, 'mariadb.sock')
  if (inside.length < 100) return inside
  const hash = createHash('sha1').update(dataDir).digest('hex').slice(0, 12)
  return path.join(tmpdir(), `ferrolane-${hash}.sock`)
}

function runningAsRoot(): boolean {
  return typeof process.getuid === 'function' && process.getuid() === 0
}

/** The socket a server for this data directory listens on. */
export function mariaDbSocket(dataDir: string): string {
  return socketPath(dataDir)
}

export function findMariaDbd(): string | null {
  for (const candidate of ['/usr/sbin/mariadbd', '/usr/bin/mariadbd', '/usr/local/bin/mariadbd']) {
    if (existsSync(candidate)) return candidate
  }
  try {
    return execFileSync('sh', ['-c', 'command -v mariadbd'], { encoding: 'utf8' }).trim() || null
  } catch {
    return null
  }
}

function initialise(dataDir: string, label: string): void {
  const db = path.join(dataDir, 'db')
  if (existsSync(path.join(db, 'mysql'))) return
  console.log(`[${label}] initialising a new MariaDB data directory in ${db}`)
  // Installed beside and renamed once complete: an install killed or failed half-way would otherwise leave a
  // directory that looks ready (it has mysql/), and every later run would skip the install and be refused as root.
  const partial = `${db}.partial`
  rmSync(partial, { recursive: true, force: true })
  mkdirSync(partial, { recursive: true })
  const args = [
    '--no-defaults',
    `--datadir=${partial}`,
    '--auth-root-authentication-method=normal',
    '--skip-test-db',
    '--skip-name-resolve',
  ]
  if (runningAsRoot()) args.push('--user=root')
  execFileSync('mariadb-install-db', args, { stdio: ['ignore', 'ignore', 'inherit'] })
  rmSync(db, { recursive: true, force: true })
  renameSync(partial, db)
}

async function canConnect(socket: string): Promise<boolean> {
  try {
    const conn = await mariadb.createConnection({ socketPath: socket, user: 'root', connectTimeout: 1000 })
    await conn.end()
    return true
  } catch {
    return false
  }
}

async function waitUntil(check: () => Promise<boolean>, timeoutMs: number, what: string): Promise<void> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    if (await check()) return
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`Timed out after ${timeoutMs} ms waiting for ${what}`)
}

/** Starts the server (initialising the data directory on first use) and waits until it answers. */
export async function startMariaDb(opts: MariaDbOptions): Promise<MariaDbHandle> {
  const mariadbd = findMariaDbd()
  if (!mariadbd) throw new Error("mariadbd was not found: install Debian's mariadb-server (apt-get install mariadb-server)")
  mkdirSync(opts.dataDir, { recursive: true })
  initialise(opts.dataDir, opts.label)
  opts.beforeStart?.()
  const socket = socketPath(opts.dataDir)
  const pidFile = path.join(opts.dataDir, 'mariadb.pid')

  // A server left behind by a killed run still owns the files: reuse it rather than fight it.
  if (await canConnect(socket)) {
    console.log(`[${opts.label}] MariaDB already running on port ${opts.port}`)
    return { socket, port: opts.port, stop: () => stopByPidFile(pidFile, socket) }
  }

  const args = [
    '--no-defaults',
    `--datadir=${path.join(opts.dataDir, 'db')}`,
    `--socket=${socket}`,
    `--port=${opts.port}`,
    '--bind-address=127.0.0.1',
    `--pid-file=${pidFile}`,
    `--log-error=${path.join(opts.dataDir, 'mariadb.err')}`,
    '--skip-name-resolve',
    '--character-set-server=utf8mb4',
    '--collation-server=utf8mb4_unicode_ci',
    '--default-time-zone=+00:00',
    // 1 GB, not 256 MB: a 100 000-row import or a 25 000-row reversal on the bench's database (about 1 GB
    // on disk) touches more index pages than 256 MB holds, so InnoDB evicted and wrote pages mid-statement
    // (25 000-row reversal 2.7-2.9 s against 1.9-2.3 s; README, performance notes). Linux lends the pool's
    // memory only as pages are used: an idle server takes about 15 MB more, a small database no more.
    '--innodb-buffer-pool-size=1G',
    `--innodb-flush-log-at-trx-commit=${opts.durability === 'relaxed' ? 2 : 1}`,
    '--max-connections=300',
    ...(opts.extraArgs ?? []),
  ]
  if (runningAsRoot()) args.push('--user=root')
  // Its own process group: a Ctrl-C in the terminal reaches the start script, which then shuts
  // MariaDB down in order, after the server that uses it.
  const child: ChildProcess = spawn(mariadbd, args, { stdio: 'ignore', detached: true })
  let exited = false
  child.on('exit', () => {
    exited = true
  })
  try {
    await waitUntil(
      async () => {
        if (exited) throw new Error(`mariadbd exited at start; see ${path.join(opts.dataDir, 'mariadb.err')}`)
        return canConnect(socket)
      },
      opts.readyTimeoutMs ?? 60_000,
      `MariaDB on port ${opts.port}`,
    )
  } catch (err) {
    const log = path.join(opts.dataDir, 'mariadb.err')
    if (existsSync(log)) console.error(readFileSync(log, 'utf8').split('\n').slice(-15).join('\n'))
    throw err
  }
  console.log(`[${opts.label}] MariaDB listening on 127.0.0.1:${opts.port}`)
  return {
    socket,
    port: opts.port,
    stop: async () => {
      // SIGTERM is mariadbd's clean shutdown: it flushes InnoDB and removes its pid file.
      if (!exited) {
        child.kill('SIGTERM')
        await waitUntil(async () => exited, 60_000, 'MariaDB to shut down')
      }
      // A test that restarted the server leaves a new one behind; it goes too.
      if (await canConnect(socket)) await stopByPidFile(pidFile, socket)
    },
  }
}

async function stopByPidFile(pidFile: string, socket: string): Promise<void> {
  if (!existsSync(pidFile)) return
  const pid = Number(readFileSync(pidFile, 'utf8').trim())
  if (!pid) return
  try {
    process.kill(pid, 'SIGTERM')
  } catch {
    return
  }
  await waitUntil(async () => !(await canConnect(socket)), 60_000, 'MariaDB to shut down')
}

/**
 * Waits until InnoDB has purged every deleted row it still keeps for older readers (MariaDB 10.3+:
 * `SET GLOBAL innodb_max_purge_lag_wait = 0` returns once the history list is empty). The bench runs
 * it after each reversal it makes to leave its database as it found it, so that clean-up is not
 * counted in the next figure, in this run or the next one (README, performance notes). Returns the ms waited.
 */
export async function waitForPurge(dataDir: string): Promise<number> {
  const t0 = Date.now()
  const conn = await mariadb.createConnection({ socketPath: socketPath(dataDir), user: 'root' })
  try {
    await conn.query('SET GLOBAL innodb_max_purge_lag_wait = 0')
  } finally {
    await conn.end()
  }
  return Date.now() - t0
}

/** Drops a database so a test run starts from nothing. */
export async function dropDatabase(socket: string, name: string): Promise<void> {
  const conn = await mariadb.createConnection({ socketPath: socket, user: 'root' })
  try {
    await conn.query('DROP DATABASE IF EXISTS `' + name.replace(/`/g, '``') + '`')
  } finally {
    await conn.end()
  }
}

/** Creates the database and the application's own account (the app never runs as root). */
export async function ensureDatabase(socket: string, db: { name: string; user: string; password: string }): Promise<void> {
  const conn = await mariadb.createConnection({ socketPath: socket, user: 'root' })
  try {
    const ident = (s: string) => '`' + s.replace(/`/g, '``') + '`'
    await conn.query(`CREATE DATABASE IF NOT EXISTS ${ident(db.name)} CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`)
    for (const host of ['127.0.0.1', 'localhost']) {
      await conn.query(`CREATE USER IF NOT EXISTS ?@? IDENTIFIED BY ?`, [db.user, host, db.password])
      await conn.query(`ALTER USER ?@? IDENTIFIED BY ?`, [db.user, host, db.password])
      await conn.query(`GRANT ALL PRIVILEGES ON ${ident(db.name)}.* TO ?@?`, [db.user, host])
    }
  } finally {
    await conn.end()
  }
}
