import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Writable } from 'node:stream'
import request from 'supertest'
import { QueryTypes, type Sequelize } from 'sequelize'
import { createApp, type FerrolaneApp } from '../../server/app'
import { createSequelize } from '../../server/db'
import { createLogger } from '../../server/observability/logger'
import { cleanDatabase, testConfig } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { parsePrometheus } from '../helpers/prometheus'

// Issue #18 point 4: a database error's log line and the /metrics access rules behind a proxy.

let sequelize: Sequelize
let built: FerrolaneApp
let logged = ''
const TOKEN = 'another-metrics-token-for-tests-4567'

beforeAll(async () => {
  const config = testConfig({ TRUST_PROXY: '1', METRICS_TOKEN: TOKEN })
  sequelize = createSequelize(config)
  const sink = new Writable({
    write(chunk, _enc, done) {
      logged += chunk.toString()
      done()
    },
  })
  built = createApp(config, sequelize, { logger: createLogger('info', sink) })
  await cleanDatabase(sequelize)
})
afterAll(async () => {
  await sequelize.close()
})

describe('the log of a request that fails in the database', () => {
  it(
    'when saving a patient fails on a real SQL error, then the 500 is ' + 'logged with the error class and codes, and no SQL value',
    async () => {
      const nurse = await makeStaff('nurse')
      const c = await new Client(built.app).mustSignIn(nurse.email, nurse.password)
      // Breaks the INSERT the route makes, so MariaDB itself refuses it (error 1054, unknown column).
      await sequelize.query('ALTER TABLE patients RENAME COLUMN family_name TO family_name_moved', { type: QueryTypes.RAW })
      try {
        const res = await c.post('/api/patients', {
          mrn: 'ZR4418207',
          givenName: 'Peregrine',
          familyName: 'Stallworthy',
          dateOfBirth: '1952-06-14',
          sex: 'male',
        })
        expect(res.status).toBe(500)
        expect(res.body.error.message).toMatch(/reference/)
      } finally {
        await sequelize.query('ALTER TABLE patients RENAME COLUMN family_name_moved TO family_name', { type: QueryTypes.RAW })
      }
      const lines = logged
        .split('\n')
        .filter(Boolean)
        .map((l) => JSON.parse(l) as Record<string, unknown>)
      const failure = lines.find((l) => l.msg === 'unexpected error')
      expect(failure).toMatchObject({ level: 50, err: { errorClass: expect.stringMatching(/Error$/), dbErrno: 1054 } })
      expect(lines.some((l) => l.route === 'POST /api/patients' && (l.res as { statusCode: number }).statusCode === 500)).toBe(true)
      for (const value of ['ZR4418207', 'Peregrine', 'Stallworthy', '1952-06-14', 'INSERT', 'family_name'])
        expect(logged).not.toContain(value)
      // The error was counted as a database error.
      const scrape = await request(built.app).get('/metrics').set('Authorization', `Bearer ${TOKEN}`).expect(200)
      expect(
        parsePrometheus(scrape.text).samples.find((s) => s.name === 'ferrolane_db_errors_total' && s.labels.kind === 'query')?.value,
      ).toBeGreaterThanOrEqual(1)
    },
  )
})

describe('/metrics behind a reverse proxy (TRUST_PROXY=1)', () => {
  it('then even a loopback caller needs the token, and a forwarded-for header does not stand in for it', async () => {
    await request(built.app).get('/metrics').expect(404)
    await request(built.app).get('/metrics').set('X-Forwarded-For', '127.0.0.1').expect(404)
    await request(built.app).get('/metrics').set('Authorization', 'Basic eDp5').expect(403)
    await request(built.app).get('/metrics').set('Authorization', `Bearer ${TOKEN}x`).expect(403)
    const ok = await request(built.app).get('/metrics').set('Authorization', `Bearer ${TOKEN}`).expect(200)
    expect(ok.headers['content-type']).toMatch(/^text\/plain/)
    expect(parsePrometheus(ok.text).types.get('ferrolane_db_pool_open')).toBe('gauge')
  })
})
