import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { spawn } from 'node:child_process'
import { serverCommand } from '../helpers/serverProcess'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { makeStaff } from '../helpers/factories'
import { loadConfig } from '../../server/config'
import { configProblems } from '../../server/productionChecks'

let t: TestApp
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
})

/** A hospital's own settings: every production check passes on these. */
const GOOD = {
  NODE_ENV: 'production',
  SESSION_SECRET: 'a-real-hospital-secret-0f9a8b7c6d5e4f3a2b1c',
  COOKIE_SECURE: 'true',
  CLINIC_NAME: 'Example Infirmary',
  CLINIC_PHONE: '01632 960 999',
  CLINIC_EMAIL: 'appointments@infirmary.example',
  STATIC_DIR: '',
  PORT: '0',
  FERROLANE_DEMO: '',
}

/** Starts the real server process and waits for it to listen or to exit. */
function startServer(env: Record<string, string>): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const server = serverCommand()
    const child = spawn(server.cmd, server.args, { cwd: server.cwd, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] })
    let out = ''
    const onData = (b: Buffer) => {
      out += b.toString()
      if (out.includes('Ferrolane listening')) child.kill('SIGTERM')
    }
    child.stdout.on('data', onData)
    child.stderr.on('data', onData)
    child.on('exit', (code) => resolve({ code: out.includes('Ferrolane listening') ? 0 : code, out }))
  })
}

describe('production settings', () => {
  it("then the development and demo values are each named as a problem, and a hospital's own settings pass", () => {
    const dev = loadConfig({ NODE_ENV: 'production', SESSION_SECRET: 'ferrolane-local-development-secret' })
    const problems = configProblems(dev).join('\n')
    for (const v of ['SESSION_SECRET', 'COOKIE_SECURE', 'DB_PASSWORD', 'CLINIC_NAME', 'CLINIC_PHONE', 'CLINIC_EMAIL'])
      expect(problems).toContain(v)
    expect(configProblems(loadConfig({ ...GOOD, DB_PASSWORD: 'a-db-password-of-its-own' }))).toEqual([])
    expect(configProblems(loadConfig({ ...GOOD, DB_PASSWORD: 'x-y-z-own', PASSWORD_SCRYPT_LOG2N: '14' })).join()).toMatch(
      /PASSWORD_SCRYPT_LOG2N is 14/,
    )
  })

  it(
    'when NODE_ENV=production starts on the development secret, an insecure cookie and the demo clinic, then the server refuses to ' +
      'start and says why',
    async () => {
      const { code, out } = await startServer({
        NODE_ENV: 'production',
        SESSION_SECRET: 'ferrolane-local-development-secret',
        COOKIE_SECURE: 'false',
        STATIC_DIR: '',
        PORT: '0',
        FERROLANE_DEMO: '',
      })
      expect(code).toBe(1)
      expect(out).toMatch(/will not start in production/)
      expect(out).toMatch(/SESSION_SECRET is the development value/)
      expect(out).toMatch(/COOKIE_SECURE is off/)
      expect(out).toMatch(/invented demo hospital/)
      expect(out).not.toMatch(/Ferrolane listening/)
    },
    60_000,
  )

  it('when the demo accounts exist in the database, then a production start is refused; without them it starts', async () => {
    await makeStaff('admin', { email: 'admin@ferrolane.test' })
    const refused = await startServer(GOOD)
    expect(refused.code, refused.out).toBe(1)
    expect(refused.out).toMatch(/demo accounts exist in this database \(admin@ferrolane\.test\)/)

    await cleanDatabase(t.sequelize)
    const started = await startServer(GOOD)
    expect(started.code, started.out).toBe(0)
  }, 90_000)

  it('when npm start runs the demo (FERROLANE_DEMO=true), then production mode starts on demo settings with a warning', async () => {
    const demo = await startServer({
      NODE_ENV: 'production',
      FERROLANE_DEMO: 'true',
      SESSION_SECRET: 'ferrolane-local-demo-secret-change-me-in-production',
      STATIC_DIR: '',
      PORT: '0',
    })
    expect(demo.code, demo.out).toBe(0)
    expect(demo.out).toMatch(/running the DEMO/)
  }, 60_000)
})
