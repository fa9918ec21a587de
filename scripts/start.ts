/**
 * npm start: private MariaDB (.data/), migrations, demo data when empty, maildev, client build,
 * then the server. Ctrl-C stops everything it started and shuts MariaDB down cleanly.
 * `--dev` (npm run dev) skips the build and runs the server under `tsx watch` beside Vite's
 * dev server (http://127.0.0.1:5173, which proxies /api to the server).
 */
import { spawn, type ChildProcess } from 'node:child_process'
import path from 'node:path'
import { startStack, repoRoot, intFromEnv } from './lib/stack'
import { prepareDatabase } from './lib/prepare'
import { DEMO_PASSWORD, DEMO_ACCOUNTS } from '../seed/demo/staff'

const dev = process.argv.includes('--dev')
const port = intFromEnv('PORT', 8080)
const mailWebPort = intFromEnv('MAILDEV_WEB_PORT', 1080)

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, { cwd: repoRoot, env, stdio: 'inherit' })
    child.on('exit', (code) => (code === 0 ? resolve() : reject(new Error(`${cmd} ${args.join(' ')} exited with ${code}`))))
  })
}

async function main(): Promise<void> {
  const stack = await startStack({
    label: 'start',
    dataDir: path.resolve(repoRoot, process.env.FERROLANE_DATA_DIR || '.data'),
    dbPort: intFromEnv('DB_PORT', 3406),
    dbName: process.env.DB_NAME || 'ferrolane',
    dbUser: process.env.DB_USER || 'ferrolane',
    dbPassword: process.env.DB_PASSWORD || 'ferrolane-local',
    smtpPort: intFromEnv('SMTP_PORT', 1025),
    mailWebPort,
  })
  let server: ChildProcess | null = null
  let vite: ChildProcess | null = null
  let stopping = false
  const stopAll = async (signal: string) => {
    if (stopping) return
    stopping = true
    console.log(`\n[start] ${signal}: stopping Ferrolane, maildev and MariaDB...`)
    vite?.kill('SIGTERM')
    if (server && server.exitCode === null) {
      server.kill('SIGTERM')
      await new Promise((r) => server!.once('exit', r))
    }
    await stack.stop()
    console.log('[start] stopped cleanly; your data is kept in .data/')
    process.exit(0)
  }
  process.on('SIGINT', () => void stopAll('SIGINT'))
  process.on('SIGTERM', () => void stopAll('SIGTERM'))

  try {
    const env: NodeJS.ProcessEnv = { ...process.env, ...stack.env, PORT: String(port), NODE_ENV: process.env.NODE_ENV || (dev ? 'development' : 'production') }
    env.SESSION_SECRET ||= 'ferrolane-local-demo-secret-change-me-in-production'
    // The demo takes laboratory results and theatre bookings over MLLP (npm run hl7:send).
    env.HL7_MLLP_ENABLED ||= 'true'
    const seeded = await prepareDatabase(env, { seedDemo: true })
    console.log(seeded ? '[start] loaded the demo scenario (invented data)' : '[start] database already has data; demo not reloaded')
    if (dev) {
      vite = spawn(path.join(repoRoot, 'node_modules/.bin/vite'), ['--host', '127.0.0.1'], { cwd: repoRoot, env, stdio: 'inherit' })
    } else {
      console.log('[start] building the client...')
      await run(path.join(repoRoot, 'node_modules/.bin/vite'), ['build', '--logLevel', 'warn'], env)
    }
    const serverArgs = dev ? ['watch', 'server/index.ts'] : ['server/index.ts']
    server = spawn(path.join(repoRoot, 'node_modules/.bin/tsx'), serverArgs, { cwd: repoRoot, env, stdio: 'inherit' })
    server.on('exit', (code) => {
      if (!stopping) {
        console.error(`[start] the server exited (${code}); stopping the rest`)
        void stopAll('server exit')
      }
    })
    console.log(`
  Ferrolane      http://127.0.0.1:${dev ? 5173 : port}
  maildev        http://127.0.0.1:${mailWebPort}   (every e-mail the app sends lands here)
  HL7 MLLP       ${env.HL7_MLLP_HOST || "127.0.0.1"}:${env.HL7_MLLP_PORT || 2575}   (npm run hl7:send -- seed/hl7/*.hl7)
  Demo sign-ins  (password for all: ${DEMO_PASSWORD})
${DEMO_ACCOUNTS.map((a) => `    ${a.role.padEnd(8)} ${a.email}`).join('\n')}
  Ctrl-C stops everything.
`)
  } catch (err) {
    console.error('[start] failed:', err instanceof Error ? err.message : err)
    await stopAll('error')
  }
}

void main()
