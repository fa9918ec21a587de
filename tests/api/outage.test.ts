import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createServer } from 'node:net'
import { readFileSync } from 'node:fs'
import path from 'node:path'
import { QueryTypes } from 'sequelize'
import { startMariaDb, ensureDatabase, dropDatabase, type MariaDbHandle } from '../../scripts/lib/mariadb'
import { createSequelize } from '../../server/db'
import { migrate } from '../../server/migrate'
import { makeTestApp, testConfig, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'

// Issue #12, points 4 and 8: MariaDB killed (SIGKILL) under a steady load of writes. This file
// runs its OWN MariaDB (a data directory beside the test one, a free port), so the shared test
// database that other files use is never touched.
const DB = { name: 'ferrolane_outage', user: 'ferrolane_outage', password: 'ferrolane-outage-only' }
const dataDir = path.join(process.env.MARIADB_DATA_DIR || path.resolve('.test-data'), 'outage')
let port = 0
let db: MariaDbHandle
let t: TestApp
let nurse: StaffFixture

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

const startDb = () => startMariaDb({ dataDir, port, label: 'outage-test', durability: 'relaxed' })
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))

beforeAll(async () => {
  port = await freePort()
  db = await startDb()
  await dropDatabase(db.socket, DB.name)
  await ensureDatabase(db.socket, DB)
  const env = { DB_SOCKET: db.socket, DB_PORT: String(port), DB_NAME: DB.name, DB_USER: DB.user, DB_PASSWORD: DB.password }
  const setup = createSequelize(testConfig(env))
  await migrate(setup)
  await setup.close()
  t = makeTestApp(env)
  nurse = await makeStaff('nurse')
}, 180_000)

afterAll(async () => {
  await t?.close()
  await db?.stop()
}, 120_000)

interface Answer {
  mrn: string
  status: number
  at: number
  retryAfter?: string
  code?: string
}

describe('when MariaDB dies under a load of patient registrations and comes back', () => {
  it('then every answer is 201 or 503 with Retry-After, the app recovers by itself, and every acknowledged write is kept', async () => {
    const asNurse = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
    const answers: Answer[] = []
    const reads: Answer[] = []
    let running = true
    let n = 0
    const writer = async (w: number) => {
      while (running) {
        n += 1
        const mrn = `OUT${w}${String(n).padStart(6, '0')}`
        const res = await asNurse.post('/api/patients', {
          mrn,
          givenName: 'Outage',
          familyName: `Test${n}`,
          dateOfBirth: '1970-01-01',
          sex: 'female',
        })
        answers.push({ mrn, status: res.status, at: Date.now(), retryAfter: res.headers['retry-after'], code: res.body?.error?.code })
        if (res.status !== 201) await sleep(20)
      }
    }
    const reader = async () => {
      while (running) {
        const res = await asNurse.get('/api/worklist')
        reads.push({ mrn: '', status: res.status, at: Date.now(), retryAfter: res.headers['retry-after'], code: res.body?.error?.code })
        await sleep(20)
      }
    }
    const load = Promise.all([writer(1), writer(2), writer(3), reader()])
    await sleep(1500)
    const pid = Number(readFileSync(path.join(dataDir, 'mariadb.pid'), 'utf8').trim())
    process.kill(pid, 'SIGKILL')
    const killedAt = Date.now()
    await sleep(3000)
    db = await startDb()
    const backAt = Date.now()
    await sleep(3000)
    running = false
    await load

    const all = [...answers, ...reads]
    expect(
      all.filter((a) => a.status !== 201 && a.status !== 200 && a.status !== 503),
      JSON.stringify(all.filter((a) => a.status >= 500 && a.status !== 503).slice(0, 3)),
    ).toEqual([])
    const outage = all.filter((a) => a.status === 503)
    expect(outage.length).toBeGreaterThan(10)
    expect(outage.every((a) => a.retryAfter === '5' && a.code === 'unavailable')).toBe(true)
    expect(answers.some((a) => a.status === 201 && a.at < killedAt)).toBe(true)
    // Recovery without restarting the app: writes and reads succeed again after MariaDB is back.
    expect(answers.some((a) => a.status === 201 && a.at > backAt)).toBe(true)
    expect(reads.some((a) => a.status === 200 && a.at > backAt)).toBe(true)

    const acknowledged = answers.filter((a) => a.status === 201).map((a) => a.mrn)
    const stored = await t.sequelize.query<{ mrn: string }>('SELECT mrn FROM patients', { type: QueryTypes.SELECT })
    const kept = new Set(stored.map((r) => r.mrn))
    expect(
      acknowledged.filter((m) => !kept.has(m)),
      'acknowledged but lost',
    ).toEqual([])
    // A refused write left nothing half-written: each stored patient has its registration audit row.
    const [orphans] = await t.sequelize.query<{ n: number }>(
      `SELECT COUNT(*) AS n FROM patients p WHERE NOT EXISTS (SELECT 1 FROM audit_entries a WHERE a.entity = 'patient' AND ` +
        `a.entity_id = p.id AND a.action = 'create')`,
      { type: QueryTypes.SELECT },
    )
    expect(Number(orphans!.n)).toBe(0)
  }, 120_000)
})
