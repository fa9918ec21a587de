import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, type TestApp } from '../helpers/app'
import type { Client } from '../helpers/agent'
import { Maildev } from '../helpers/mail'
import { at, bookedAppointment, replyTokenIn, summerDay, type BookingFixture } from '../helpers/appointmentFactories'
import { drainOutbox } from '../../server/services/outboxWorker'
import { hashReplyToken } from '../../server/services/appointmentTokens'
import { Appointment, AppointmentEvent, AppointmentReplyToken, AppointmentTask } from '../../server/models/index'

let t: TestApp
const mail = Maildev.fromEnv()
let f: BookingFixture
let nurse: Client
let patient: Client
let appointmentId: number
let token: string
// A low limit keeps the throttling test short.
beforeAll(() => {
  t = makeTestApp({ REPLY_MAX_BAD_TOKENS: '4' })
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  const b = await bookedAppointment(t, mail, { givenName: 'Linnet', location: 'Anaemia Clinic, Outpatients B' })
  f = b.f
  nurse = b.nurse
  appointmentId = b.appointmentId
  patient = b.patient
  token = replyTokenIn((await mail.to(f.email))[0]!)
})

const status = async () => (await Appointment.findByPk(appointmentId, { raw: true }))!.status

describe('the reply page', () => {
  it(
    'when the patient opens the link, then it shows first name, date, ' + 'time, place and kind, and nothing clinical or identifying',
    async () => {
      const res = await patient.get(`/api/replies/${token}`).expect(200)
      expect(res.body).toMatchObject({
        firstName: 'Linnet',
        kindLabel: 'Anaemia clinic appointment',
        time: '10:00',
        endTime: '10:30',
        timeZone: 'Europe/London',
        place: 'Anaemia Clinic, Outpatients B',
        status: 'booked',
        confirmed: false,
        rebookRequested: false,
        clinic: { phone: '01632 960 418' },
      })
      expect(res.body.date).toMatch(/^\w+day \d+ July \d{4}$/)
      const body = JSON.stringify(res.body)
      expect(body).not.toMatch(/Bramblewick|TST\d|KV\d|anaem(ic|ia severity)|ferritin|diagnos/i)
      expect(res.headers['cache-control']).toBe('no-store')
    },
  )

  it('then the database holds only the sha256 of the token, never the token', async () => {
    const rows = await AppointmentReplyToken.findAll({ raw: true })
    expect(rows).toHaveLength(1)
    expect(rows[0]!.tokenHash).toBe(hashReplyToken(token))
    expect(JSON.stringify(rows)).not.toContain(token)
  })
})

describe('confirming', () => {
  it(
    'when the patient confirms, then the appointment is confirmed and the history records the patient; a second confirm is refused ' +
      'and changes nothing',
    async () => {
      const res = await patient.post(`/api/replies/${token}/confirm`)
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body).toMatchObject({ status: 'confirmed', confirmed: true })
      expect(await status()).toBe('confirmed')
      const again = await patient.post(`/api/replies/${token}/confirm`)
      expect(again.status).toBe(409)
      expect(again.body.error).toMatchObject({ code: 'reply_already_used' })
      expect(again.body.error.message).toMatch(/already confirmed.*call the Pre-operative Anaemia Service on 01632 960 418/)
      expect(await AppointmentEvent.count({ where: { appointmentId, kind: 'confirmed', userId: null } })).toBe(1)
    },
  )

  it('when the POST has no CSRF token, then 403 and nothing changes', async () => {
    const res = await patient.agent.post(`/api/replies/${token}/confirm`).send({})
    expect(res.status).toBe(403)
    expect(await status()).toBe('booked')
  })
})

describe('asking to rebook', () => {
  it(
    "when the patient asks to rebook with a message, then the nurses' task list shows it and the appointment is marked; moving it " +
      'closes the task',
    async () => {
      const res = await patient.post(`/api/replies/${token}/rebook`, { message: 'I am away that week, any day after the 20th suits.' })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body).toMatchObject({ status: 'rebook-requested', rebookRequested: true })
      const tasks = (await nurse.get('/api/tasks?status=open').expect(200)).body.rows
      expect(tasks).toEqual([
        expect.objectContaining({
          kind: 'rebook-request',
          status: 'open',
          message: 'I am away that week, any day after the 20th suits.',
          referralId: f.referralId,
          appointment: expect.objectContaining({ id: appointmentId, status: 'rebook-requested' }),
        }),
      ])
      expect((await patient.post(`/api/replies/${token}/rebook`, {})).body.error.code).toBe('reply_already_used')
      expect(await AppointmentTask.count()).toBe(1)
      await nurse.patch(`/api/appointments/${appointmentId}`, { version: 1, startsAt: at(summerDay(9), '10:00') }).expect(200)
      expect((await nurse.get('/api/tasks?status=open').expect(200)).body.rows).toEqual([])
    },
  )

  it(
    'when the appointment was moved after the e-mail, then the old link is refused as out of date and the new e-mail carries a ' +
      'working one',
    async () => {
      await nurse.patch(`/api/appointments/${appointmentId}`, { version: 1, startsAt: at(summerDay(), '11:00') }).expect(200)
      await drainOutbox({ sequelize: t.sequelize, config: t.config })
      const old = await patient.post(`/api/replies/${token}/confirm`)
      expect(old.status).toBe(410)
      expect(old.body.error.code).toBe('reply_link_superseded')
      const fresh = replyTokenIn((await mail.to(f.email))[1]!)
      expect((await patient.get(`/api/replies/${fresh}`).expect(200)).body.time).toBe('11:00')
    },
  )
})

describe('links that do not work', () => {
  it('when the token is wrong, then 404 with what to do, and nothing changes', async () => {
    const res = await patient.post(`/api/replies/${'x'.repeat(43)}/confirm`)
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('reply_link_unknown')
    expect(res.body.error.message).toMatch(/do not recognise this link.*01632 960 418/)
    expect(await status()).toBe('booked')
  })

  it('when the appointment is over, then 410 expired and nothing changes', async () => {
    const past = new Date(Date.now() - 2 * 3_600_000)
    await Appointment.update({ startsAt: past, endsAt: new Date(past.getTime() + 30 * 60_000) }, { where: { id: appointmentId } })
    const res = await patient.post(`/api/replies/${token}/confirm`)
    expect(res.status).toBe(410)
    expect(res.body.error.code).toBe('reply_link_expired')
    expect(await status()).toBe('booked')
  })

  it('when the appointment was cancelled, then 410 says so', async () => {
    await nurse.post(`/api/appointments/${appointmentId}/cancel`, { reason: 'Clinic closed' }).expect(200)
    const res = await patient.get(`/api/replies/${token}`)
    expect(res.status).toBe(410)
    expect(res.body.error.code).toBe('appointment_cancelled')
  })

  it('when one address tries too many unknown links, then it is throttled (429) even with the right link', async () => {
    for (let i = 0; i < 4; i++) expect((await patient.get(`/api/replies/guess${i}`)).status).toBe(404)
    const res = await patient.get(`/api/replies/${token}`)
    expect(res.status).toBe(429)
    expect(res.body.error.message).toMatch(/Wait 15 minutes.*01632 960 418/)
    expect((await patient.post(`/api/replies/${token}/confirm`)).status).toBe(429)
    expect(await status()).toBe('booked')
  })

  it('when a link is used correctly, reused or expired, then it does not count towards the throttle', async () => {
    for (let i = 0; i < 6; i++) await patient.get(`/api/replies/${token}`).expect(200)
    await patient.post(`/api/replies/${token}/confirm`).expect(200)
    for (let i = 0; i < 5; i++) expect((await patient.post(`/api/replies/${token}/confirm`)).status).toBe(409)
    await patient.get(`/api/replies/${token}`).expect(200)
  })
})
