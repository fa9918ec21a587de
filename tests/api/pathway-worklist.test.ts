import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { addDays, todayIso, WORKLIST_FLAGS } from '../../shared/pathway'
import { WORKLIST_SORTS } from '../../shared/schemas/referrals'

let t: TestApp
let nurse: Client
let surgeonA: StaffFixture
let surgeonB: StaffFixture
const today = todayIso()
const d = (n: number) => addDays(today, n)
const ago = (days: number) => new Date(Date.now() - days * 86_400_000)
const named: Record<string, number> = {}

/**
 * One fixed list for the whole file (reads only): each referral is built to meet, or just
 * miss, one filter or flag.
 */
beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  const n = await makeStaff('nurse')
  surgeonA = await makeStaff('surgeon', { name: 'Alpha Surgeon' })
  surgeonB = await makeStaff('surgeon', { name: 'Beta Surgeon' })
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  const knee = await makeProcedure({ code: 'TKR' })
  const hip = await makeProcedure({ code: 'THR' })
  const add = async (key: string, family: string, surgeon: StaffFixture, proc: { id: number }, o: Parameters<typeof makeReferral>[1]) => {
    const p = await makePatient({ familyName: family, mrn: `KV${String(Object.keys(named).length + 1).padStart(6, '0')}` })
    named[key] = (await makeReferral({ patientId: p.id, procedureId: proc.id, surgeonId: surgeon.id }, o)).id
  }
  await add('soonAnaemic', 'Abbott', surgeonA, knee, {
    stage: 'clinic',
    plannedSurgeryDate: d(10),
    anaemic: true,
    latestHbGL: 104,
    latestHbAt: ago(3),
    priority: 'cancer',
  })
  await add('soonNotAnaemic', 'Baxter', surgeonA, hip, {
    stage: 'cleared',
    plannedSurgeryDate: d(12),
    anaemic: false,
    latestHbGL: 141,
    latestHbAt: ago(5),
  })
  await add('farAnaemic', 'Carver', surgeonB, knee, {
    stage: 'treating',
    plannedSurgeryDate: d(60),
    anaemic: true,
    latestHbGL: 109,
    latestHbAt: ago(20),
    treatmentOrderedAt: ago(6),
    recheckDueDate: d(-2),
  })
  await add('noResult', 'Dunmore', surgeonB, hip, { stage: 'referred', plannedSurgeryDate: d(40), priority: 'urgent' })
  await add('recheckDone', 'Ellery', surgeonA, knee, {
    stage: 'recheck',
    plannedSurgeryDate: d(30),
    anaemic: true,
    latestHbGL: 121,
    latestHbAt: ago(1),
    recheckDueDate: d(-3),
    treatmentOrderedAt: ago(30),
    treatmentGivenAt: ago(28),
  })
  await add('operated', 'Fenwick', surgeonB, hip, {
    stage: 'operated',
    plannedSurgeryDate: d(0),
    anaemic: true,
    latestHbGL: 99,
    latestHbAt: ago(9),
  })
  await add('soonAnaemic28', 'Garrow', surgeonB, knee, {
    stage: 'screened',
    plannedSurgeryDate: d(28),
    anaemic: true,
    latestHbGL: 126,
    latestHbAt: ago(2),
  })
  await add('anaemic29', 'Hartley', surgeonA, hip, {
    stage: 'screened',
    plannedSurgeryDate: d(29),
    anaemic: true,
    latestHbGL: 128,
    latestHbAt: ago(2),
  })
})
afterAll(async () => {
  await t.close()
})

type Row = {
  id: number
  patientName: string
  flags: string[]
  stage: string
  plannedSurgeryDate: string
  latestHbGL: number | null
  patient: { familyName: string }
  priority: string
}
const list = async (query: string, c: Client = nurse) => {
  const res = await c.get(`/api/worklist${query}`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body as { rows: Row[]; total: number }
}
const ids = (rows: Row[]) => rows.map((r) => r.id).sort((a, b) => a - b)
const keys = (...k: string[]) => k.map((x) => named[x]!).sort((a, b) => a - b)

describe('worklist filters', () => {
  it('then each row carries what the table shows', async () => {
    const { rows, total } = await list('?q=Abbott')
    expect(total).toBe(1)
    expect(rows[0]).toMatchObject({
      id: named.soonAnaemic,
      version: 1,
      stage: 'clinic',
      stageLabel: 'For anaemia clinic',
      nextAction: 'Review in anaemia clinic',
      plannedSurgeryDate: d(10),
      daysToSurgery: 10,
      latestHbGL: 104,
      anaemic: true,
      priority: 'cancer',
      flags: ['surgery-soon-anaemic'],
      patient: { familyName: 'Abbott' },
      procedure: { code: 'TKR' },
      surgeon: { id: surgeonA.id, name: 'Alpha Surgeon' },
    })
    expect(rows[0]!.patientName).toMatch(/^Abbott, /)
  })

  it('when filtered by stage (one or several), then only those stages', async () => {
    expect(ids((await list('?stage=screened')).rows)).toEqual(keys('soonAnaemic28', 'anaemic29'))
    expect(ids((await list('?stage=referred,operated')).rows)).toEqual(keys('noResult', 'operated'))
  })

  it('when filtered by surgeon, operation or priority, then only those', async () => {
    expect(ids((await list(`?surgeonId=${surgeonB.id}`)).rows)).toEqual(keys('farAnaemic', 'noResult', 'operated', 'soonAnaemic28'))
    expect(ids((await list('?procedureCode=thr')).rows)).toEqual(keys('soonNotAnaemic', 'noResult', 'operated', 'anaemic29'))
    expect(ids((await list('?priority=cancer,urgent')).rows)).toEqual(keys('soonAnaemic', 'noResult'))
  })

  it('when filtered by a surgery date window, then the bounds are inclusive', async () => {
    expect(ids((await list(`?from=${d(10)}&to=${d(28)}`)).rows)).toEqual(keys('soonAnaemic', 'soonNotAnaemic', 'soonAnaemic28'))
  })

  it('when filtered by surgery-soon-anaemic, then anaemic patients with surgery 0–28 days away before theatre only', async () => {
    expect(ids((await list('?flag=surgery-soon-anaemic')).rows)).toEqual(keys('soonAnaemic', 'soonAnaemic28'))
  })

  it('when filtered by no-screening-result, re-check overdue or treatment not given, then exactly those', async () => {
    expect(ids((await list('?flag=no-screening-result')).rows)).toEqual(keys('noResult'))
    // Ellery's re-check Hb was taken after the due date, so only Carver is overdue.
    expect(ids((await list('?flag=recheck-overdue')).rows)).toEqual(keys('farAnaemic'))
    expect(ids((await list('?flag=treatment-not-given')).rows)).toEqual(keys('farAnaemic'))
  })

  it('then every flag filter agrees with the flags shown on the rows', async () => {
    const all = (await list('?pageSize=100')).rows
    for (const flag of WORKLIST_FLAGS) {
      const filtered = ids((await list(`?flag=${flag}`)).rows)
      expect(filtered, flag).toEqual(ids(all.filter((r) => r.flags.includes(flag))))
    }
  })

  it('when searched by name or MRN prefix, then matches only', async () => {
    expect((await list('?q=dun')).rows.map((r) => r.patient.familyName)).toEqual(['Dunmore'])
    expect((await list('?q=KV00000')).total).toBe(8)
    expect((await list('?q=100%25')).total).toBe(0)
  })
})

describe('worklist sorting and paging', () => {
  it('when sorted by planned surgery date either way, then rows follow it', async () => {
    const asc = (await list('?sort=plannedSurgeryDate&pageSize=100')).rows.map((r) => r.plannedSurgeryDate)
    expect(asc).toEqual([...asc].sort())
    const desc = (await list('?sort=-daysToSurgery&pageSize=100')).rows.map((r) => r.plannedSurgeryDate)
    expect(desc).toEqual([...asc].reverse())
  })

  it('when sorted by latest Hb, then lowest first and episodes without an Hb last', async () => {
    const hbs = (await list('?sort=latestHb')).rows.map((r) => r.latestHbGL)
    expect(hbs).toEqual([99, 104, 109, 121, 126, 128, 141, null])
    expect((await list('?sort=-latestHb')).rows.map((r) => r.latestHbGL)).toEqual([141, 128, 126, 121, 109, 104, 99, null])
  })

  it('when sorted by stage, family name or priority, then in pathway order, alphabetical, and most pressing first', async () => {
    expect((await list('?sort=stage')).rows.map((r) => r.stage)).toEqual([
      'referred',
      'screened',
      'screened',
      'clinic',
      'treating',
      'recheck',
      'cleared',
      'operated',
    ])
    const names = (await list('?sort=familyName')).rows.map((r) => r.patient.familyName)
    expect(names).toEqual([...names].sort())
    expect((await list('?sort=-familyName')).rows[0]!.patient.familyName).toBe('Hartley')
    expect((await list('?sort=priority')).rows.slice(0, 2).map((r) => r.priority)).toEqual(['cancer', 'urgent'])
  })

  it('then every whitelisted sort is accepted, and anything else is 400 naming sort', async () => {
    for (const sort of WORKLIST_SORTS) expect((await list(`?sort=${encodeURIComponent(sort)}`)).total).toBe(8)
    const res = await nurse.get('/api/worklist?sort=mrn;DROP')
    expect(res.status).toBe(400)
    expect(res.body.error.fields.sort).toMatch(/sort must be one of/)
  })

  it('when paged, then the total counts every match and pages do not overlap', async () => {
    const p1 = await list('?pageSize=3&page=1')
    const p3 = await list('?pageSize=3&page=3')
    expect([p1.total, p1.rows.length, p3.rows.length]).toEqual([8, 3, 2])
    const everything = [...p1.rows, ...(await list('?pageSize=3&page=2')).rows, ...p3.rows].map((r) => r.id)
    expect(new Set(everything).size).toBe(8)
    expect((await list('?stage=screened&pageSize=1')).total).toBe(2)
  })

  it('when the query is malformed, then 400 names the parameter', async () => {
    for (const [q, field] of [
      ['?pageSize=500', 'pageSize'],
      ['?page=0', 'page'],
      ['?flag=late', 'flag[0]'],
      ['?stage=limbo', 'stage[0]'],
      [`?from=${d(5)}&to=${d(1)}`, 'to'],
      ['?from=2026-02-31', 'from'],
    ]) {
      const res = await nurse.get(`/api/worklist${q}`)
      expect(res.status, q).toBe(400)
      expect(Object.keys(res.body.error.fields), q).toContain(field)
    }
  })
})

describe('surgeons see their own patients', () => {
  it("when a surgeon opens the worklist, then only their patients; asking for another surgeon's list is 403", async () => {
    const s = await new Client(t.app).mustSignIn(surgeonA.email, surgeonA.password)
    const { rows, total } = await list('', s)
    expect(total).toBe(4)
    expect(rows.every((r) => (r as unknown as { surgeon: { id: number } }).surgeon.id === surgeonA.id)).toBe(true)
    expect((await s.get(`/api/worklist?surgeonId=${surgeonB.id}`)).status).toBe(403)
  })
})

describe('the next visit on each row', () => {
  it(
    'when an episode has past, cancelled and future visits, then the row ' + 'shows the soonest future one still on; none gives null',
    async () => {
      const { Appointment, Referral } = await import('../../server/models/index')
      const referral = (await Referral.findByPk(named.farAnaemic!, { raw: true }))!
      const visit = (inDays: number, kind: 'iron-infusion' | 'recheck-bloods', status: 'booked' | 'confirmed' | 'cancelled') => {
        // Whole minutes: the column keeps seconds, not milliseconds.
        const startsAt = new Date(Math.floor(Date.now() / 60_000) * 60_000 + inDays * 86_400_000)
        return Appointment.create({
          referralId: referral.id,
          patientId: referral.patientId,
          kind,
          startsAt,
          endsAt: new Date(startsAt.getTime() + 3_600_000),
          durationMin: 60,
          location: 'Day Treatment Unit',
          infusionSessionId: null,
          status,
          remindAt: null,
          createdBy: null,
        })
      }
      await visit(-2, 'recheck-bloods', 'confirmed')
      await visit(3, 'iron-infusion', 'cancelled')
      const next = await visit(5, 'iron-infusion', 'confirmed')
      await visit(9, 'recheck-bloods', 'booked')

      const { rows } = await list('?q=Carver')
      expect((rows[0] as unknown as { nextAppointment: unknown }).nextAppointment).toEqual({
        kind: 'iron-infusion',
        startsAt: next.startsAt.toISOString(),
        status: 'confirmed',
      })
      const other = await list('?q=Dunmore')
      expect((other.rows[0] as unknown as { nextAppointment: unknown }).nextAppointment).toBeNull()
    },
  )

  it(
    'when the list is read in its sort order (no search), then each row carries the same next visit ' +
      'as the searched list, on every page and in every sort',
    async () => {
      // The visits of the test above: the sorts read referrals in index order look them up in the page's own statement.
      const nextOf = (r: unknown) => (r as { id: number; nextAppointment: unknown }).nextAppointment
      const searched = (await list('?q=Carver')).rows[0]!
      expect(nextOf(searched)).toMatchObject({ kind: 'iron-infusion', status: 'confirmed' })
      for (const sort of WORKLIST_SORTS) {
        const seen = new Map<number, unknown>()
        for (const page of [1, 2, 3, 4, 5, 6]) {
          for (const r of (await list(`?sort=${sort}&pageSize=2&page=${page}`)).rows) seen.set(r.id, nextOf(r))
        }
        expect(seen.get(named.farAnaemic!), sort).toEqual(nextOf(searched))
        expect(seen.get(named.noResult!), sort).toBeNull()
      }
    },
  )
})
