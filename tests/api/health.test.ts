import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { makeTestApp, type TestApp } from '../helpers/app'
import { startMariaDb } from '../../scripts/lib/mariadb'
import { existsSync, readFileSync } from 'node:fs'
import path from 'node:path'

let t: TestApp
beforeAll(() => { t = makeTestApp() })
afterAll(async () => { await t.close() })

async function pollHealth(want: number, timeoutMs: number) {
  const deadline = Date.now() + timeoutMs
  let last = await request(t.app).get('/api/health')
  while (last.status !== want && Date.now() < deadline) {
    await new Promise((r) => setTimeout(r, 500))
    last = await request(t.app).get('/api/health')
  }
  return last
}

describe('health', () => {
  it('when MariaDB is up, then /api/health answers 200 ok/up', async () => {
    const res = await request(t.app).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ status: 'ok', db: 'up' })
  })

  it('when the test stops its MariaDB, then health reports down (503), and recovers by itself when it returns', async () => {
    const dataDir = process.env.MARIADB_DATA_DIR!
    const pidFile = path.join(dataDir, 'mariadb.pid')
    expect(existsSync(pidFile)).toBe(true)
    const pid = Number(readFileSync(pidFile, 'utf8').trim())
    process.kill(pid, 'SIGTERM')
    const down = await pollHealth(503, 60_000)
    expect(down.status).toBe(503)
    expect(down.body).toMatchObject({ status: 'degraded', db: 'down', error: { code: 'unavailable' } })
    expect(down.headers['retry-after']).toBe('5')

    // Restarted as npm test started it: a throw-away instance, commits flushed about once a second.
    await startMariaDb({ dataDir, port: Number(process.env.DB_PORT), label: 'health-test', durability: 'relaxed' })
    const up = await pollHealth(200, 30_000)
    expect(up.status).toBe(200)
    expect(up.body.db).toBe('up')
  }, 120_000)
})
