import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { at, bookingFixture, makeSession, summerDay, type BookingFixture } from '../helpers/appointmentFactories'
import { Appointment, OutboxMessage } from '../../server/models/index'

let t: TestApp
let nurse: Client
let patients: BookingFixture[]
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  patients = []
  for (let i = 0; i < 3; i++) patients.push(await bookingFixture())
  nurse = await new Client(t.app).mustSignIn(patients[0]!.nurse.email, patients[0]!.nurse.password)
})

const day = summerDay(1)
const infusion = (p: BookingFixture, hhmm: string, o: Record<string, unknown> = {}) =>
  nurse.post('/api/appointments', {
    referralId: p.referralId,
    kind: 'iron-infusion',
    startsAt: at(day, hhmm),
    durationMin: 60,
    location: 'Day Treatment Unit, Level 2',
    ...o,
  })

describe('infusion chairs', () => {
  it(
    'when every chair is taken at that time, then 409 session_full with the next free slots in error.details.suggestions, and ' +
      'nothing is written',
    async () => {
      const session = await makeSession(day, '09:00', '12:00', 2)
      await infusion(patients[0]!, '09:00').expect(201)
      await infusion(patients[1]!, '09:30').expect(201)
      const before = { appointments: await Appointment.count(), messages: await OutboxMessage.count() }
      const res = await infusion(patients[2]!, '09:30')
      expect(res.status).toBe(409)
      expect(res.body.error.code).toBe('session_full')
      expect(res.body.error.message).toMatch(/chair/)
      const suggestions = res.body.error.details.suggestions as {
        sessionId: number
        startsAt: string
        date: string
        time: string
        location: string
      }[]
      // 09:00–10:00 and 09:30–10:30 hold both chairs until 10:00; the first free hour starts then.
      expect(suggestions.map((s) => s.time)).toEqual(['10:00', '10:15', '10:30'])
      expect(suggestions[0]).toMatchObject({
        sessionId: session.id,
        date: day,
        startsAt: at(day, '10:00'),
        location: 'Day Treatment Unit, Level 2',
      })
      expect({ appointments: await Appointment.count(), messages: await OutboxMessage.count() }).toEqual(before)
      // Taking the suggestion works.
      await infusion(patients[2]!, suggestions[0]!.time).expect(201)
    },
  )

  it('when the time lies outside every session, then 409 outside_session with suggestions from the next session', async () => {
    await makeSession(summerDay(3), '13:00', '16:00', 6)
    const res = await infusion(patients[0]!, '09:00')
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('outside_session')
    expect(res.body.error.details.suggestions[0]).toMatchObject({ date: summerDay(3), time: '13:00' })
  })

  it('when a booked infusion is cancelled, then its chair is free again', async () => {
    await makeSession(day, '09:00', '11:00', 1)
    const a = (await infusion(patients[0]!, '09:00').expect(201)).body.appointment
    expect((await infusion(patients[1]!, '09:00')).status).toBe(409)
    await nurse.post(`/api/appointments/${a.id}/cancel`, { reason: 'Patient unwell' }).expect(200)
    await infusion(patients[1]!, '09:00').expect(201)
  })

  it('when an infusion is moved into a full slot, then 409; moving it within its own chair is allowed', async () => {
    await makeSession(day, '09:00', '12:00', 1)
    const a = (await infusion(patients[0]!, '09:00').expect(201)).body.appointment
    const b = (await infusion(patients[1]!, '10:00').expect(201)).body.appointment
    expect((await nurse.patch(`/api/appointments/${b.id}`, { version: 1, startsAt: at(day, '09:30') })).body.error.code).toBe(
      'session_full',
    )
    await nurse.patch(`/api/appointments/${a.id}`, { version: 1, durationMin: 45 }).expect(200)
  })

  it('when other kinds of visit are booked, then they need no infusion session', async () => {
    await nurse
      .post('/api/appointments', {
        referralId: patients[0]!.referralId,
        kind: 'pre-assessment-bloods',
        startsAt: at(day, '08:00'),
        durationMin: 15,
        location: 'Phlebotomy, Level 0',
      })
      .expect(201)
  })
})

describe('one place at a time', () => {
  it('when a patient already has an overlapping appointment, then 409 double_booked; back-to-back is fine', async () => {
    const p = patients[0]!
    const body = { referralId: p.referralId, kind: 'anaemia-clinic', durationMin: 30, location: 'Anaemia Clinic' }
    await nurse.post('/api/appointments', { ...body, startsAt: at(day, '14:00') }).expect(201)
    const res = await nurse.post('/api/appointments', { ...body, kind: 'recheck-bloods', startsAt: at(day, '14:15') })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('double_booked')
    expect(res.body.error.fields.startsAt).toMatch(/overlaps/)
    expect(res.body.error.message).toContain(`on ${day} from 14:00 to 14:30`)
    await nurse.post('/api/appointments', { ...body, kind: 'recheck-bloods', startsAt: at(day, '14:30') }).expect(201)
  })

  it('when two bookings for the same patient race, then exactly one succeeds', async () => {
    const p = patients[0]!
    const other = await new Client(t.app).mustSignIn(p.nurse.email, p.nurse.password)
    const body = {
      referralId: p.referralId,
      kind: 'anaemia-clinic',
      startsAt: at(day, '15:00'),
      durationMin: 30,
      location: 'Anaemia Clinic',
    }
    const results = await Promise.all([nurse.post('/api/appointments', body), other.post('/api/appointments', body)])
    expect(results.map((r) => r.status).sort()).toEqual([201, 409])
  })
})

describe('infusion sessions (admin)', () => {
  it('when an admin adds a session in clinic time, then it reads back in clinic time with its load', async () => {
    const admin = await makeStaff('admin')
    const c = await new Client(t.app).mustSignIn(admin.email, admin.password)
    const created = await c.post('/api/infusion-sessions', {
      date: day,
      startTime: '09:00',
      endTime: '12:30',
      chairs: 6,
      location: 'Day Treatment Unit',
    })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    // In July, 09:00 in London is 08:00 UTC.
    expect(created.body).toMatchObject({
      date: day,
      startTime: '09:00',
      endTime: '12:30',
      timeZone: 'Europe/London',
      startsAt: `${day}T08:00:00.000Z`,
      chairs: 6,
      bookings: 0,
      full: false,
      version: 1,
    })
    await infusion(patients[0]!, '09:00').expect(201)
    const list = await nurse.get(`/api/infusion-sessions?from=${day}&to=${day}`).expect(200)
    expect(list.body.rows).toEqual([expect.objectContaining({ id: created.body.id, bookings: 1, peakChairsInUse: 1 })])
    expect(
      (await c.post('/api/infusion-sessions', { date: day, startTime: '12:00', endTime: '09:00', chairs: 6, location: 'X unit' })).body
        .error.fields.endTime,
    ).toMatch(/after/)
  })

  it(
    'when an admin lowers chairs below the patients booked at once, or shrinks hours past a booking, then 409; otherwise it is ' + 'saved',
    async () => {
      const admin = await makeStaff('admin')
      const c = await new Client(t.app).mustSignIn(admin.email, admin.password)
      const s = await makeSession(day, '09:00', '12:00', 3)
      await infusion(patients[0]!, '09:00').expect(201)
      await infusion(patients[1]!, '09:00').expect(201)
      expect((await c.patch(`/api/infusion-sessions/${s.id}`, { version: 1, chairs: 1 })).body.error.code).toBe('chairs_in_use')
      expect((await c.patch(`/api/infusion-sessions/${s.id}`, { version: 1, startTime: '09:30' })).body.error.code).toBe(
        'session_has_bookings',
      )
      const ok = await c.patch(`/api/infusion-sessions/${s.id}`, { version: 1, chairs: 2, endTime: '13:00' })
      expect(ok.status, JSON.stringify(ok.body)).toBe(200)
      expect(ok.body).toMatchObject({ chairs: 2, endTime: '13:00', full: true, version: 2 })
      expect((await c.patch(`/api/infusion-sessions/${s.id}`, { version: 1, chairs: 4 })).body.error.code).toBe('stale_version')
    },
  )
})
