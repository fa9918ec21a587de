/**
 * npm start: private MariaDB (.data/), migrations, demo data when empty, maildev, client build,
 * then the server. Ctrl-C stops everything it started and shuts MariaDB down cleanly.
 * Production runs the compiled server (dist-server/) with plain node.
 * `--dev` (npm run dev) skips the builds and runs the server under `tsx watch` beside Vite's
 * dev server (http://127.0.0.1:5173, which proxies /api to the server).
 */
import { spawn, type ChildProcess } from 'node:child_process'
import path from 'node:path'
import { startStack, repoRoot, intFromEnv } from './lib/stack'
import { prepareDatabase } from './lib/prepare'
import { DEMO_PASSWORD, DEMO_ACCOUNTS } from '../seed/demo/staff'
import { demoClinicEnv } from '../seed/demo/hospital'
import { DEMO_DIRECTORY, DEMO_DIRECTORY_PASSWORD, DEMO_GROUP_ROLES_SETTING, DEMO_OIDC_CLIENT } from '../seed/demo/directory'
import { startFakeIdentityProvider, type FakeIdentityProvider } from './lib/fakeIdentityProvider'

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
  let directory: FakeIdentityProvider | null = null
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
    await directory?.stop().catch(() => {})
    await stack.stop()
    console.log('[start] stopped cleanly; your data is kept in .data/')
    process.exit(0)
  }
  process.on('SIGINT', () => void stopAll('SIGINT'))
  process.on('SIGTERM', () => void stopAll('SIGTERM'))

  try {
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      ...stack.env,
      PORT: String(port),
      NODE_ENV: process.env.NODE_ENV || (dev ? 'development' : 'production'),
    }
    env.SESSION_SECRET ||= 'ferrolane-local-demo-secret-change-me-in-production'
    // npm start is the demo: the server skips its production refusals (and says so) for it.
    env.FERROLANE_DEMO ||= 'true'
    // ...and its clinic is the invented demo hospital, unless CLINIC_* say otherwise.
    Object.assign(env, demoClinicEnv(env))
    // The demo hospital's directory, unless a real provider is configured.
    if (!env.OIDC_ISSUER) {
      const appUrl = (env.PUBLIC_URL || `http://127.0.0.1:${dev ? 5173 : port}`).replace(/\/$/, '')
      directory = await startFakeIdentityProvider({
        port: intFromEnv('OIDC_FAKE_PORT', 9090),
        directory: DEMO_DIRECTORY,
        clients: [
          {
            ...DEMO_OIDC_CLIENT,
            redirectUris: [`${appUrl}/api/auth/oidc/callback`],
            postLogoutRedirectUris: [`${appUrl}/sign-in?signedOut=1`],
          },
        ],
      })
      Object.assign(env, {
        OIDC_ISSUER: directory.issuer,
        OIDC_CLIENT_ID: DEMO_OIDC_CLIENT.clientId,
        OIDC_CLIENT_SECRET: DEMO_OIDC_CLIENT.clientSecret,
        OIDC_REDIRECT_URI: `${appUrl}/api/auth/oidc/callback`,
        OIDC_POST_LOGOUT_REDIRECT_URI: `${appUrl}/sign-in?signedOut=1`,
        OIDC_GROUP_ROLES: env.OIDC_GROUP_ROLES || DEMO_GROUP_ROLES_SETTING,
        OIDC_DISPLAY_NAME: env.OIDC_DISPLAY_NAME || 'Kestrel Vale staff directory',
      })
    }
    // The demo takes laboratory results and theatre bookings over MLLP (npm run hl7:send).
    env.HL7_MLLP_ENABLED ||= 'true'
    if (!dev) {
      // Production runs the compiled server, and its migrations, with plain node.
      console.log('[start] compiling the server...')
      await run('bash', ['scripts/build-server.sh'], env)
      await run(process.execPath, ['dist-server/server/migrateMain.js'], env)
    }
    const seeded = await prepareDatabase(env, { seedDemo: true })
    console.log(seeded ? '[start] loaded the demo scenario (invented data)' : '[start] database already has data; demo not reloaded')
    if (dev) {
      vite = spawn(path.join(repoRoot, 'node_modules/.bin/vite'), ['--host', '127.0.0.1'], { cwd: repoRoot, env, stdio: 'inherit' })
    } else {
      console.log('[start] building the client...')
      await run(path.join(repoRoot, 'node_modules/.bin/vite'), ['build', '--logLevel', 'warn'], env)
    }
    server = dev
      ? spawn(path.join(repoRoot, 'node_modules/.bin/tsx'), ['watch', 'server/index.ts'], { cwd: repoRoot, env, stdio: 'inherit' })
      : // Through the one launcher that sets node's flags (scripts/node-server.sh), as production does.
        spawn('sh', ['scripts/node-server.sh', 'dist-server/server/index.js'], {
          cwd: repoRoot,
          env: { ...env, NODE: process.execPath },
          stdio: 'inherit',
        })
    server.on('exit', (code) => {
      if (!stopping) {
        console.error(`[start] the server exited (${code}); stopping the rest`)
        void stopAll('server exit')
      }
    })
    console.log(`
  Ferrolane      http://127.0.0.1:${dev ? 5173 : port}
  maildev        http://127.0.0.1:${mailWebPort}   (every e-mail the app sends lands here)
  HL7 MLLP       ${env.HL7_MLLP_HOST || '127.0.0.1'}:${env.HL7_MLLP_PORT || 2575}   (npm run hl7:send -- seed/hl7/*.hl7)
  Demo sign-ins  (password for all: ${DEMO_PASSWORD})
${DEMO_ACCOUNTS.map((a) => `    ${a.role.padEnd(8)} ${a.email}`).join('\n')}
${
  directory
    ? `  Directory      ${directory.issuer}   (fake identity provider; password for all: ${DEMO_DIRECTORY_PASSWORD})
${DEMO_DIRECTORY.map((p) => `    ${p.email.padEnd(42)} ${p.groups.join(', ')}`).join('\n')}
`
    : ''
}  Ctrl-C stops everything.
`)
  } catch (err) {
    console.error('[start] failed:', err instanceof Error ? err.message : err)
    await stopAll('error')
  }
}

void main()
