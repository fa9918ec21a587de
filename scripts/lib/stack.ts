/** The private services that the start, test and bench commands each run for themselves. */
import path from 'node:path'
import { startMariaDb, ensureDatabase, dropDatabase, type MariaDbHandle } from './mariadb'
import { startMaildev, type MaildevHandle } from './maildev'

export interface StackOptions {
  label: string
  dataDir: string
  dbPort: number
  dbName: string
  dbUser: string
  dbPassword: string
  smtpPort?: number
  mailWebPort?: number
  /** Start from an empty database (tests and bench). */
  freshDatabase?: boolean
  /** See MariaDbOptions.durability: full unless a throw-away instance asks for relaxed. */
  durability?: 'full' | 'relaxed'
}

export interface Stack {
  mariadb: MariaDbHandle
  maildev: MaildevHandle | null
  /** The environment that points the server (or the tests) at these services. */
  env: Record<string, string>
  stop(): Promise<void>
}

export const repoRoot = path.resolve(import.meta.dirname, '..', '..')

export async function startStack(opts: StackOptions): Promise<Stack> {
  const mariadb = await startMariaDb({ dataDir: opts.dataDir, port: opts.dbPort, label: opts.label, durability: opts.durability })
  if (opts.freshDatabase) await dropDatabase(mariadb.socket, opts.dbName)
  await ensureDatabase(mariadb.socket, { name: opts.dbName, user: opts.dbUser, password: opts.dbPassword })
  let maildev: MaildevHandle | null = null
  if (opts.smtpPort && opts.mailWebPort) {
    maildev = await startMaildev({ smtpPort: opts.smtpPort, webPort: opts.mailWebPort, label: opts.label })
  }
  const env: Record<string, string> = {
    DB_HOST: '127.0.0.1',
    DB_PORT: String(opts.dbPort),
    DB_NAME: opts.dbName,
    DB_USER: opts.dbUser,
    DB_PASSWORD: opts.dbPassword,
    MARIADB_DATA_DIR: opts.dataDir,
    MARIADB_SOCKET: mariadb.socket,
    // The app talks to its private server over the socket; the port stays open for tools.
    DB_SOCKET: mariadb.socket,
    // Episode documents and letters live beside the data they belong to, never under the web root.
    UPLOAD_DIR: path.join(opts.dataDir, 'uploads'),
  }
  if (maildev) {
    env.SMTP_HOST = '127.0.0.1'
    env.SMTP_PORT = String(maildev.smtpPort)
    env.MAILDEV_WEB_PORT = String(maildev.webPort)
  }
  return {
    mariadb,
    maildev,
    env,
    stop: async () => {
      await maildev?.stop().catch(() => {})
      await mariadb.stop()
    },
  }
}

export function intFromEnv(key: string, fallback: number): number {
  const raw = process.env[key]
  return raw ? Number(raw) : fallback
}
