import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, type TestApp } from '../helpers/app'
import { startMariaDb } from '../../scripts/lib/mariadb'
import { migrations } from '../../server/migrations/index'
import { existsSync, readFileSync } from 'node:fs'
import path from 'node:path'

let t: TestApp
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})

async function poll(url: string, want: number, timeoutMs: number) {
  const deadline = Date.now() + timeoutMs
  let last = await request(t.app).get(url)
  while (last.status !== want && Date.now() < deadline) {
    await new Promise((r) => setTimeout(r, 500))
    last = await request(t.app).get(url)
  }
  return last
}

describe('health', () => {
  it('when the process is serving, then /api/health answers 200 ok without asking the database', async () => {
    const res = await request(t.app).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ status: 'ok' })
  })

  it('when MariaDB is up and migrated (a single server, no cluster), then /api/health/ready answers 200 ready', async () => {
    const res = await request(t.app).get('/api/health/ready')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ status: 'ready', db: 'up', cluster: 'standalone', migrations: 'current' })
  })

  it('when the newest migration is not recorded as applied, then ready answers 503 migrations-pending', async () => {
    const newest = migrations[migrations.length - 1].name
    await t.sequelize.query('DELETE FROM schema_migrations WHERE name = ?', { replacements: [newest], type: QueryTypes.DELETE })
    try {
      const res = await request(t.app).get('/api/health/ready')
      expect(res.status).toBe(503)
      expect(res.headers['retry-after']).toBe('5')
      expect(res.body).toMatchObject({
        status: 'not-ready',
        db: 'up',
        migrations: 'pending',
        reason: 'migrations-pending',
        error: { code: 'unavailable' },
      })
      expect(res.body.error.message).toMatch(/upgrade/)
    } finally {
      await t.sequelize.query('INSERT INTO schema_migrations (name) VALUES (?)', { replacements: [newest], type: QueryTypes.INSERT })
    }
    expect((await request(t.app).get('/api/health/ready')).status).toBe(200)
  })

  it(
    'when the test stops its MariaDB, then ready reports 503 unavailable ' + 'while alive stays 200, and both recover by themselves',
    async () => {
      const dataDir = process.env.MARIADB_DATA_DIR!
      const pidFile = path.join(dataDir, 'mariadb.pid')
      expect(existsSync(pidFile)).toBe(true)
      const pid = Number(readFileSync(pidFile, 'utf8').trim())
      process.kill(pid, 'SIGTERM')
      const down = await poll('/api/health/ready', 503, 60_000)
      expect(down.status).toBe(503)
      expect(down.body).toMatchObject({ status: 'not-ready', db: 'down', reason: 'database-unreachable', error: { code: 'unavailable' } })
      expect(down.headers['retry-after']).toBe('5')
      const alive = await request(t.app).get('/api/health')
      expect(alive.status).toBe(200)

      // Restarted as npm test started it: a throw-away instance, commits flushed about once a second.
      await startMariaDb({ dataDir, port: Number(process.env.DB_PORT), label: 'health-test', durability: 'relaxed' })
      const up = await poll('/api/health/ready', 200, 30_000)
      expect(up.status).toBe(200)
      expect(up.body.status).toBe('ready')
    },
    120_000,
  )
})
