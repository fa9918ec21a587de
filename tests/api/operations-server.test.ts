import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { spawn, type ChildProcess } from 'node:child_process'
import { createServer } from 'node:net'
import { networkInterfaces } from 'node:os'
import request from 'supertest'
import { serverCommand } from '../helpers/serverProcess'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { parsePrometheus } from '../helpers/prometheus'

// Issue #18 point 4: the server as production runs it (compiled, plain node), its JSON log and
// its /metrics, over real TCP against the test database.

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer()
      .listen(0, '127.0.0.1', () => {
        const p = (s.address() as { port: number }).port
        s.close(() => resolve(p))
      })
      .on('error', reject)
  })
}

/** This machine's own non-loopback address: a request to it arrives from it, not from 127.0.0.1. */
const outside = Object.values(networkInterfaces())
  .flat()
  .find((a) => a && a.family === 'IPv4' && !a.internal)?.address

const TOKEN = 'metrics-token-for-the-test-run-only-0123'
let t: TestApp
let child: ChildProcess
let port = 0
let out = ''
const lines = () =>
  out
    .split('\n')
    .filter((l) => l.startsWith('{'))
    .map((l) => JSON.parse(l) as Record<string, unknown>)

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  port = await freePort()
  const server = serverCommand()
  // 0.0.0.0 so the same process can be reached from this machine's other address.
  child = spawn(server.cmd, server.args, {
    cwd: server.cwd,
    env: {
      ...process.env,
      PORT: String(port),
      HOST: '0.0.0.0',
      STATIC_DIR: '',
      OUTBOX_POLL_MS: '3600000',
      LOG_LEVEL: 'info',
      METRICS_TOKEN: TOKEN,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  child.stdout!.on('data', (d: Buffer) => {
    out += d.toString()
  })
  child.stderr!.on('data', (d: Buffer) => {
    out += d.toString()
  })
  const deadline = Date.now() + 60_000
  while (!out.includes('Ferrolane listening')) {
    if (Date.now() > deadline || child.exitCode !== null) throw new Error(`the compiled server did not start:\n${out}`)
    await new Promise((r) => setTimeout(r, 100))
  }
})
afterAll(async () => {
  if (child && child.exitCode === null) {
    child.kill('SIGTERM')
    await new Promise((r) => child.once('exit', r))
  }
  await t?.close()
})

describe('the compiled server under plain node', () => {
  it('answers /api/health and /api/health/ready and signs a member of staff in', async () => {
    const base = `http://127.0.0.1:${port}`
    await request(base).get('/api/health').expect(200, { status: 'ok' })
    await request(base).get('/api/health/ready').expect(200, { status: 'ready', db: 'up', cluster: 'standalone', migrations: 'current' })
    const nurse = await makeStaff('nurse')
    const c = await new Client(base).mustSignIn(nurse.email, nurse.password)
    expect((await c.get('/api/auth/me')).status).toBe(200)
  })

  it(
    'when a request carries patient details in its body and query, then the log has its route, user and status but none of those ' +
      'details',
    async () => {
      const base = `http://127.0.0.1:${port}`
      const nurse = await makeStaff('nurse')
      const c = await new Client(base).mustSignIn(nurse.email, nurse.password)
      // Invented patient; each value is distinctive so a leak anywhere in the log is found.
      const patient = {
        mrn: 'QX7731904',
        givenName: 'Ottoline',
        familyName: 'Brackenridge',
        dateOfBirth: '1947-11-23',
        sex: 'female',
        phone: '01632 960 487',
        email: 'o.brackenridge@example.net',
        heightCm: 158,
        weightKg: 61.4,
      }
      const created = await c.post('/api/patients', patient)
      expect(created.status, JSON.stringify(created.body)).toBe(201)
      await c.get('/api/patients?q=Brackenridge').expect(200)
      await c.get(`/api/patients/${created.body.id}`).expect(200)
      await new Promise((r) => setTimeout(r, 300))
      for (const value of ['QX7731904', 'Ottoline', 'Brackenridge', '1947-11-23', '960 487', 'example.net', '61.4', c.csrf])
        expect(out).not.toContain(value)
      // No raw URL, header or cookie is logged either.
      expect(out).not.toMatch(/ferrolane\.sid|cookie|"url"/i)
      const create = lines().find((l) => l.route === 'POST /api/patients')
      expect(create).toMatchObject({ level: 30, msg: 'request finished', userId: nurse.id, res: { statusCode: 201 } })
      expect(typeof (create!.req as { id: string }).id).toBe('string')
      expect(typeof create!.ms).toBe('number')
      expect(lines().some((l) => l.route === 'GET /api/patients/:id' && l.userId === nurse.id)).toBe(true)
    },
  )

  it('publishes /metrics to this machine and to the token, and hides it from another address however it names itself', async () => {
    const scrape = await request(`http://127.0.0.1:${port}`).get('/metrics').expect(200)
    const { types, samples } = parsePrometheus(scrape.text)
    expect(types.get('ferrolane_http_requests_total')).toBe('counter')
    expect(types.get('ferrolane_http_request_duration_seconds')).toBe('histogram')
    // Labelled by pattern: the patient's id in the URL is not a label value.
    const routes = new Set(samples.filter((s) => s.name === 'ferrolane_http_requests_total').map((s) => s.labels.route))
    expect(routes).toContain('GET /api/patients/:id')
    expect([...routes].some((r) => /\/\d+/.test(r))).toBe(false)
    for (const name of [
      'ferrolane_db_pool_in_use',
      'ferrolane_db_pool_max',
      'ferrolane_outbox_backlog',
      'ferrolane_outbox_oldest_age_seconds',
      'ferrolane_hl7_attention_queue',
      'ferrolane_nodejs_eventloop_lag_seconds',
      'ferrolane_process_resident_memory_bytes',
    ]) {
      expect(
        samples.some((s) => s.name === name),
        name,
      ).toBe(true)
    }
    expect(samples.find((s) => s.name === 'ferrolane_outbox_backlog')!.value).toBe(0)

    if (!outside) return expect.fail('this machine has no non-loopback IPv4 address to test from')
    const far = `http://${outside}:${port}`
    await request(far).get('/metrics').expect(404)
    await request(far).get('/metrics').set('X-Forwarded-For', '127.0.0.1').expect(404)
    await request(far).get('/metrics').set('Authorization', 'Bearer not-the-token').expect(403)
    const withToken = await request(far).get('/metrics').set('Authorization', `Bearer ${TOKEN}`).expect(200)
    expect(parsePrometheus(withToken.text).samples.length).toBeGreaterThan(20)
  })
})
