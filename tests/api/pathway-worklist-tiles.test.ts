import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { addDays, todayIso, WORKLIST_FLAGS } from '../../shared/pathway'
import type { WorklistCounts } from '../../shared/pathway/views'

/**
 * GET /api/worklist/counts answers every count tile at once. Each figure must be the very total
 * the worklist gives for the same slice, for every role (surgeons only their own patients).
 */
let t: TestApp
let nurse: Client
let doctor: Client
let surgeon: Client
let surgeonA: StaffFixture
let surgeonB: StaffFixture
let anyReferral = 0
const today = todayIso()
const d = (n: number) => addDays(today, n)
const ago = (days: number) => new Date(Date.now() - days * 86_400_000)

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  const [n, doc] = [await makeStaff('nurse'), await makeStaff('doctor')]
  surgeonA = await makeStaff('surgeon', { name: 'Alpha Surgeon' })
  surgeonB = await makeStaff('surgeon', { name: 'Beta Surgeon' })
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  doctor = await new Client(t.app).mustSignIn(doc.email, doc.password)
  surgeon = await new Client(t.app).mustSignIn(surgeonA.email, surgeonA.password)
  const knee = await makeProcedure({ code: 'TKR' })
  let i = 0
  const add = async (s: StaffFixture, o: Parameters<typeof makeReferral>[1]) => {
    const p = await makePatient({ mrn: `TL${String(++i).padStart(6, '0')}` })
    anyReferral = (await makeReferral({ patientId: p.id, procedureId: knee.id, surgeonId: s.id }, o)).id
  }
  await add(surgeonA, { stage: 'clinic', plannedSurgeryDate: d(10), anaemic: true, latestHbGL: 104, latestHbAt: ago(3) })
  await add(surgeonA, { stage: 'referred', plannedSurgeryDate: d(40) })
  await add(surgeonA, {
    stage: 'treating',
    plannedSurgeryDate: d(60),
    anaemic: true,
    latestHbGL: 109,
    latestHbAt: ago(20),
    treatmentOrderedAt: ago(6),
    recheckDueDate: d(-2),
  })
  await add(surgeonB, { stage: 'screened', plannedSurgeryDate: d(20), anaemic: true, latestHbGL: 111, latestHbAt: ago(2) })
  await add(surgeonB, { stage: 'referred', plannedSurgeryDate: d(35) })
  await add(surgeonB, { stage: 'referred', plannedSurgeryDate: d(36) })
  await add(surgeonB, { stage: 'operated', plannedSurgeryDate: d(0), anaemic: true, latestHbGL: 99, latestHbAt: ago(9) })
})
afterAll(async () => {
  await t.close()
})

const worklistTotal = async (c: Client, query: string) => {
  const res = await c.get(`/api/worklist?pageSize=1${query}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return (res.body as { total: number }).total
}
const counts = async (c: Client, query = '') => {
  const res = await c.get(`/api/worklist/counts${query}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body as WorklistCounts
}

describe('the count tiles in one request', () => {
  it('when nurse, doctor or surgeon asks, then each count equals the worklist total for that tile alone', async () => {
    for (const c of [nurse, doctor, surgeon]) {
      const all = await counts(c)
      expect(Object.keys(all.flags).sort()).toEqual([...WORKLIST_FLAGS].sort())
      expect(all.total).toBe(await worklistTotal(c, ''))
      for (const flag of WORKLIST_FLAGS) expect(all.flags[flag], flag).toBe(await worklistTotal(c, `&flag=${flag}`))
    }
  })

  it('when the whole clinic is counted, then the figures are the ones the fixture was built with', async () => {
    // Built above: two without a screening Hb before surgery, two anaemic within 28 days, one re-check overdue;
    // nobody has had iron and a re-check yet, so no response flag.
    expect(await counts(nurse)).toEqual({
      total: 7,
      flags: {
        'surgery-soon-anaemic': 2,
        'no-screening-result': 3,
        'recheck-overdue': 1,
        'treatment-not-given': 1,
        'date-change-requested': 0,
        'no-response-to-iron': 0,
        'hb-falling': 0,
      },
    })
  })

  it('when a surgeon asks, then only their own patients are counted', async () => {
    const own = await counts(surgeon)
    expect(own.total).toBe(3)
    expect(own).toEqual(await counts(nurse, `?surgeonId=${surgeonA.id}`))
    expect(own.flags['no-screening-result']).toBe(1)
    const res = await surgeon.get(`/api/worklist/counts?surgeonId=${surgeonB.id}`)
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('not_your_patient')
  })

  it('when tiles and filters are named, then only those tiles are counted within the filtered slice', async () => {
    const some = await counts(doctor, '?flag=surgery-soon-anaemic,recheck-overdue&stage=clinic,treating,recheck')
    expect(some).toEqual({ total: 2, flags: { 'surgery-soon-anaemic': 1, 'recheck-overdue': 1 } })
    expect(some.total).toBe(await worklistTotal(doctor, '&stage=clinic,treating,recheck'))
  })

  it('when the query is wrong, then a 400 names the field and paging words are ignored', async () => {
    for (const [q, field] of [
      ['?flag=late', 'flag[0]'],
      ['?stage=limbo', 'stage[0]'],
      [`?from=${d(5)}&to=${d(1)}`, 'to'],
      ['?surgeonId=abc', 'surgeonId'],
    ]) {
      const res = await nurse.get(`/api/worklist/counts${q}`)
      expect(res.status, q).toBe(400)
      expect(Object.keys(res.body.error.fields), q).toContain(field)
    }
    expect((await counts(nurse, '?page=0&sort=nonsense')).total).toBe(7)
  })

  it('when an admin or no one asks, then the counts are refused', async () => {
    const a = await makeStaff('admin')
    const admin = await new Client(t.app).mustSignIn(a.email, a.password)
    expect((await admin.get('/api/worklist/counts')).status).toBe(403)
    expect((await new Client(t.app).get('/api/worklist/counts')).status).toBe(401)
  })
})

describe('conditional polls', () => {
  it(
    'when counts, worklist or an episode are asked again with their ETag, ' + 'then the answer is 304 with no body, still no-store',
    async () => {
      for (const path of ['/api/worklist/counts', '/api/worklist?stage=referred', `/api/referrals/${anyReferral}`]) {
        const first = await nurse.get(path)
        expect(first.status, path).toBe(200)
        expect(first.headers['cache-control'], path).toBe('no-store')
        const etag = first.headers.etag as string
        expect(etag, path).toMatch(/^W\/"/)
        const again = await nurse.get(path).set('If-None-Match', etag)
        expect(again.status, path).toBe(304)
        expect(again.text ?? '', path).toBe('')
        expect(again.headers['cache-control'], path).toBe('no-store')
        // A different tag (the data changed since) gets the whole answer again.
        expect((await nurse.get(path).set('If-None-Match', 'W/"stale"')).status, path).toBe(200)
      }
    },
  )

  it('when an episode changes between two polls, then the old ETag gets the new answer', async () => {
    const first = await nurse.get('/api/worklist/counts')
    const p = await makePatient({ mrn: 'TL999999' })
    const knee = await makeProcedure({ code: 'THR' })
    await makeReferral({ patientId: p.id, procedureId: knee.id, surgeonId: surgeonB.id }, { stage: 'referred', plannedSurgeryDate: d(50) })
    const again = await nurse.get('/api/worklist/counts').set('If-None-Match', first.headers.etag as string)
    expect(again.status).toBe(200)
    expect((again.body as WorklistCounts).total).toBe((first.body as WorklistCounts).total + 1)
  })
})
