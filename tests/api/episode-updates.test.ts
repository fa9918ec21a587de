import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { at, bookingFixture, summerDay, type BookingFixture } from '../helpers/appointmentFactories'
import type { EpisodeUpdates } from '../../shared/pathway/views'

/**
 * GET /api/referrals/:id/updates: the open episode screen's one poll. It must hold exactly what the
 * three routes it replaces answer, refuse whom they refuse, and answer 304 until something changes.
 */
let t: TestApp
let f: BookingFixture
let nurse: Client
let surgeon: Client

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  f = await bookingFixture({ givenName: 'Wrenna' })
  nurse = await new Client(t.app).mustSignIn(f.nurse.email, f.nurse.password)
  surgeon = await new Client(t.app).mustSignIn(f.surgeon.email, f.surgeon.password)
})
afterAll(async () => {
  await t.close()
})

describe('one poll for an open episode', () => {
  it('when a nurse polls, then the answer is the episode, its appointments and its messages as their own routes give them', async () => {
    const res = await nurse.get(`/api/referrals/${f.referralId}/updates`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const body = res.body as EpisodeUpdates
    expect(body.detail).toEqual((await nurse.get(`/api/referrals/${f.referralId}`)).body)
    expect(body.appointments).toEqual((await nurse.get(`/api/referrals/${f.referralId}/appointments`)).body)
    expect(body.messages).toEqual((await nurse.get(`/api/outbox?referralId=${f.referralId}`)).body)
  })

  it(
    'when nothing changed, then the ETag gets a 304 with no body; ' + 'after a booking, the same tag gets the new appointment and message',
    async () => {
      const path = `/api/referrals/${f.referralId}/updates`
      const first = await nurse.get(path)
      const etag = first.headers.etag as string
      expect(etag).toMatch(/^W\/"/)
      expect(first.headers['cache-control']).toBe('no-store')
      const same = await nurse.get(path).set('If-None-Match', etag)
      expect(same.status).toBe(304)
      expect(same.text ?? '').toBe('')
      const booked = await nurse.post('/api/appointments', {
        referralId: f.referralId,
        kind: 'anaemia-clinic',
        startsAt: at(summerDay(), '10:00'),
        durationMin: 30,
        location: 'Anaemia Clinic, Outpatients B',
      })
      expect(booked.status, JSON.stringify(booked.body)).toBe(201)
      const changed = await nurse.get(path).set('If-None-Match', etag)
      expect(changed.status).toBe(200)
      const body = changed.body as EpisodeUpdates
      expect(body.appointments.rows.map((a) => a.id)).toContain(booked.body.appointment.id)
      expect(body.messages!.rows.length).toBe((first.body as EpisodeUpdates).messages!.rows.length + 1)
    },
  )

  it("when the patient's own surgeon polls, then the messages are left out (null), as the outbox refuses surgeons", async () => {
    const res = await surgeon.get(`/api/referrals/${f.referralId}/updates`)
    expect(res.status).toBe(200)
    expect((res.body as EpisodeUpdates).messages).toBeNull()
    expect((res.body as EpisodeUpdates).detail.id).toBe(f.referralId)
    expect((await surgeon.get(`/api/outbox?referralId=${f.referralId}`)).status).toBe(403)
  })

  it('when another surgeon, an admin or nobody polls, or the episode does not exist, then it is refused and nothing is sent', async () => {
    const other = await makeStaff('surgeon')
    const admin = await makeStaff('admin')
    const otherClient = await new Client(t.app).mustSignIn(other.email, other.password)
    const adminClient = await new Client(t.app).mustSignIn(admin.email, admin.password)
    const refused = await otherClient.get(`/api/referrals/${f.referralId}/updates`)
    expect(refused.status).toBe(403)
    expect(JSON.stringify(refused.body)).not.toContain('Wrenna')
    expect((await adminClient.get(`/api/referrals/${f.referralId}/updates`)).status).toBe(403)
    expect((await new Client(t.app).get(`/api/referrals/${f.referralId}/updates`)).status).toBe(401)
    expect((await nurse.get('/api/referrals/99999999/updates')).status).toBe(404)
    expect((await nurse.get('/api/referrals/abc/updates')).status).toBe(400)
  })
})
