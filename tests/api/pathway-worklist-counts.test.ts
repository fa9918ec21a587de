import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import mariadb from 'mariadb'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { addDays, todayIso } from '../../shared/pathway'
import { COUNT_CACHE_MS } from '../../server/services/worklistCounts'

/**
 * Worklist totals are kept for COUNT_CACHE_MS. A write through this server must show at once;
 * a write by another process (here a second database connection) may lag by at most the window.
 */
let t: TestApp
let nurse: Client
let referralId: number
let version: number

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  const n = await makeStaff('nurse')
  const surgeon = await makeStaff('surgeon')
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  const proc = await makeProcedure({ code: 'TKR' })
  for (let i = 0; i < 3; i++) {
    const p = await makePatient({ mrn: `CC${i}0000` })
    const r = await makeReferral(
      { patientId: p.id, procedureId: proc.id, surgeonId: surgeon.id },
      { stage: 'screened', plannedSurgeryDate: addDays(todayIso(), 40 + i) },
    )
    referralId = r.id
    version = r.version
  }
})
afterAll(async () => {
  await t.close()
})

const total = async (query: string) => {
  const res = await nurse.get(`/api/worklist${query}`)
  expect(res.status).toBe(200)
  return (res.body as { total: number }).total
}

describe('worklist totals', () => {
  it('when a move is made through this server, then both queues count it at once', async () => {
    expect([await total('?stage=screened'), await total('?stage=clinic')]).toEqual([3, 0])
    const res = await nurse.post(`/api/referrals/${referralId}/transitions`).send({ to: 'clinic', version, reason: 'Needs the clinic' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect([await total('?stage=screened'), await total('?stage=clinic')]).toEqual([2, 1])
  })

  it('when another process writes, then the total catches up within the cache window and the rows at once', async () => {
    expect(await total('?stage=screened')).toBe(2)
    const db = t.config.db
    const other = await mariadb.createConnection({ host: db.host, port: db.port, user: db.user, password: db.password, database: db.name })
    try {
      await other.query("UPDATE referrals SET stage = 'screened' WHERE id = ?", [referralId])
    } finally {
      await other.end()
    }
    const rows = (await nurse.get('/api/worklist?stage=screened')).body as { rows: unknown[]; total: number }
    expect(rows.rows).toHaveLength(3)
    expect(rows.total).toBe(2) // kept from the read above: proves the total is not re-counted every time
    await new Promise((r) => setTimeout(r, COUNT_CACHE_MS + 200))
    expect(await total('?stage=screened')).toBe(3)
  })
})
