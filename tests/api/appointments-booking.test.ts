import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { Maildev, parseIcs, prop, icsUtc, type ReceivedMail } from '../helpers/mail'
import { at, bookingFixture, summerDay, type BookingFixture } from '../helpers/appointmentFactories'
import { drainOutbox } from '../../server/services/outboxWorker'
import { AuditEntry, OutboxMessage } from '../../server/models/index'

let t: TestApp
const mail = Maildev.fromEnv()
let f: BookingFixture
let nurse: Client
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  await mail.clear()
  f = await bookingFixture({ givenName: 'Rowan' })
  nurse = await new Client(t.app).mustSignIn(f.nurse.email, f.nurse.password)
})

const send = () => drainOutbox({ sequelize: t.sequelize, config: t.config })
const day = summerDay()
const book = (o: Record<string, unknown> = {}) =>
  nurse.post('/api/appointments', {
    referralId: f.referralId,
    kind: 'anaemia-clinic',
    startsAt: at(day, '09:30'),
    durationMin: 30,
    location: 'Anaemia Clinic, Outpatients B, Level 1',
    ...o,
  })

async function onlyMail(): Promise<ReceivedMail> {
  const got = await mail.to(f.email)
  expect(got.map((m) => m.subject)).toHaveLength(1)
  return got[0]!
}

describe('booking an appointment', () => {
  it('when a nurse books, then 201 with the appointment and its queued message, written with the booking', async () => {
    const res = await book()
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.appointment).toMatchObject({
      referralId: f.referralId,
      patientId: f.patientId,
      kind: 'anaemia-clinic',
      kindLabel: 'Anaemia clinic appointment',
      startsAt: at(day, '09:30'),
      durationMin: 30,
      status: 'booked',
      sequence: 0,
      version: 1,
    })
    expect(res.body.message).toEqual({ id: expect.any(Number), status: 'queued' })
    expect(await OutboxMessage.count()).toBe(1)
    expect(await AuditEntry.count({ where: { entity: 'appointment', action: 'create' } })).toBe(1)
  })

  it(
    'then the patient receives one e-mail with the time in the clinic zone, the place, the preparation, a reply link and a calendar ' +
      'invitation',
    async () => {
      await book().expect(201)
      expect(await send()).toMatchObject({ sent: 1, retried: 0 })
      const m = await onlyMail()
      // 09:30 in London in July is 08:30 UTC: the e-mail must say the London time and name the zone.
      // Neutral subject and sender: an inbox preview must not say what the clinic treats (issue 15).
      expect(m.subject).toMatch(/^Your hospital appointment is booked: \w{3} \d+ Jul, 09:30$/)
      expect(m.subject).not.toMatch(/anaemi|iron|infusion/i)
      expect(JSON.stringify(m.from)).not.toMatch(/anaemi|iron|infusion/i)
      expect(m.text).toContain('Anaemia clinic appointment')
      for (const part of [m.text, m.html]) {
        expect(part).toContain('09:30 to 10:00')
        expect(part).toContain('Europe/London')
        expect(part).toContain('Anaemia Clinic, Outpatients B, Level 1')
        expect(part).toContain('Bring a list of your medicines')
        expect(part).toContain('01632 960 418')
        expect(part).toMatch(/http:\/\/127\.0\.0\.1:\d+\/reply\/[A-Za-z0-9_-]{43}/)
      }
      expect(m.text).toContain('Dear Rowan,')
      expect(m.html).toContain('<h1')
      const cal = parseIcs(await mail.attachment(m))
      expect(prop(cal.properties, 'METHOD')).toBe('REQUEST')
      expect(cal.events).toHaveLength(1)
      const ev = cal.events[0]!
      expect(prop(ev, 'UID')).toMatch(/^appointment-\d+@ferrolane$/)
      expect(icsUtc(prop(ev, 'DTSTART')!).toISOString()).toBe(at(day, '09:30'))
      expect(icsUtc(prop(ev, 'DTEND')!).toISOString()).toBe(at(day, '10:00'))
      expect(prop(ev, 'SEQUENCE')).toBe('0')
      expect(prop(ev, 'STATUS')).toBe('CONFIRMED')
      expect(prop(ev, 'LOCATION')).toBe('Anaemia Clinic\\, Outpatients B\\, Level 1')
      expect(ev.find((p) => p.name === 'ORGANIZER')?.value).toMatch(/^mailto:/i)
    },
  )

  it('then the outbox shows the message as sent, with the episode filter', async () => {
    await book().expect(201)
    await send()
    const res = await nurse.get(`/api/outbox?referralId=${f.referralId}&status=sent`).expect(200)
    expect(res.body.rows).toEqual([
      expect.objectContaining({ kind: 'booking', status: 'sent', attempts: 1, toAddress: f.email, referralId: f.referralId }),
    ])
    expect((await nurse.get('/api/outbox?status=queued').expect(200)).body.rows).toEqual([])
    expect((await nurse.get('/api/outbox?status=lost').expect(400)).body.error.fields.status).toMatch(
      /queued, sending, sent, failed, bounced/,
    )
  })

  const bad: [string, Record<string, unknown>, string][] = [
    ['an unknown kind', { kind: 'massage' }, 'kind'],
    ['a time without its offset', { startsAt: `${day}T09:30:00` }, 'startsAt'],
    ['a time in the past', { startsAt: '2020-01-01T09:00:00Z' }, 'startsAt'],
    ['a duration of three minutes', { durationMin: 3 }, 'durationMin'],
    ['no place', { location: '' }, 'location'],
    ['an episode that does not exist', { referralId: 999999 }, 'referralId'],
  ]
  for (const [what, o, field] of bad) {
    it(`when the booking has ${what}, then 400 names ${field} and nothing is queued`, async () => {
      const res = await book(o)
      expect(res.status).toBe(400)
      expect(res.body.error.fields[field]).toBeTruthy()
      expect(await OutboxMessage.count()).toBe(0)
    })
  }

  it('when the patient has no e-mail address, then the appointment is booked and no message is queued', async () => {
    const g = await bookingFixture({ email: null })
    const res = await nurse.post('/api/appointments', {
      referralId: g.referralId,
      kind: 'recheck-bloods',
      startsAt: at(day, '11:00'),
      durationMin: 15,
      location: 'Phlebotomy, Level 0',
    })
    expect(res.status).toBe(201)
    expect(res.body.message).toBeNull()
    expect(await OutboxMessage.count()).toBe(0)
  })
})

describe('moving and cancelling', () => {
  it('when the appointment is moved, then the patient gets an update with the same UID, a higher SEQUENCE and the old time', async () => {
    const a = (await book().expect(201)).body.appointment
    await send()
    const res = await nurse.patch(`/api/appointments/${a.id}`, {
      version: 1,
      startsAt: at(day, '14:15'),
      location: 'Anaemia Clinic, Room 4',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.appointment).toMatchObject({ startsAt: at(day, '14:15'), sequence: 1, version: 2, status: 'booked' })
    expect(res.body.message.status).toBe('queued')
    await send()
    const [first, update] = await mail.to(f.email)
    expect(update!.subject).toMatch(/^Your hospital appointment has changed: .*14:15$/)
    expect(update!.text).toContain('It was ')
    expect(update!.text).toContain('09:30')
    const before = parseIcs(await mail.attachment(first!)).events[0]!
    const after = parseIcs(await mail.attachment(update!))
    expect(prop(after.properties, 'METHOD')).toBe('REQUEST')
    expect(prop(after.events[0]!, 'UID')).toBe(prop(before, 'UID'))
    expect(Number(prop(after.events[0]!, 'SEQUENCE'))).toBeGreaterThan(Number(prop(before, 'SEQUENCE')))
    expect(icsUtc(prop(after.events[0]!, 'DTSTART')!).toISOString()).toBe(at(day, '14:15'))
  })

  it('when someone moves it from an out-of-date copy, then 409 stale_version and nothing is queued', async () => {
    const a = (await book().expect(201)).body.appointment
    await nurse.patch(`/api/appointments/${a.id}`, { version: 1, startsAt: at(day, '14:15') }).expect(200)
    const res = await nurse.patch(`/api/appointments/${a.id}`, { version: 1, startsAt: at(day, '15:00') })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('stale_version')
    expect(await OutboxMessage.count()).toBe(2)
  })

  it(
    'when the appointment is cancelled, then the patient gets METHOD:CANCEL with STATUS:CANCELLED and the same UID, and the history ' +
      'keeps every step',
    async () => {
      const a = (await book().expect(201)).body.appointment
      await nurse.patch(`/api/appointments/${a.id}`, { version: 1, durationMin: 45 }).expect(200)
      const res = await nurse.post(`/api/appointments/${a.id}/cancel`, { reason: 'Clinic closed for training' })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body.appointment).toMatchObject({ status: 'cancelled', sequence: 2, cancelReason: 'Clinic closed for training' })
      await send()
      const mails = await mail.to(f.email)
      expect(mails.map((m) => m.subject.split(':')[0])).toEqual([
        'Your hospital appointment is booked',
        'Your hospital appointment has changed',
        'Your hospital appointment is cancelled',
      ])
      const cancel = mails[2]!
      expect(cancel.text).not.toMatch(/\/reply\//)
      expect(cancel.text).not.toContain('Clinic closed for training')
      const cal = parseIcs(await mail.attachment(cancel))
      expect(prop(cal.properties, 'METHOD')).toBe('CANCEL')
      expect(prop(cal.events[0]!, 'STATUS')).toBe('CANCELLED')
      expect(prop(cal.events[0]!, 'UID')).toBe(`appointment-${a.id}@ferrolane`)
      expect(prop(cal.events[0]!, 'SEQUENCE')).toBe('2')

      const list = (await nurse.get(`/api/referrals/${f.referralId}/appointments`).expect(200)).body.rows
      expect(list).toHaveLength(1)
      expect(list[0].events.map((e: { kind: string }) => e.kind)).toEqual(['booked', 'moved', 'cancelled'])
      expect(list[0].messages.map((m: { kind: string; status: string }) => `${m.kind}:${m.status}`)).toEqual([
        'booking:sent',
        'update:sent',
        'cancellation:sent',
      ])
      expect((await nurse.post(`/api/appointments/${a.id}/cancel`, { reason: 'again' })).body.error.code).toBe('already_cancelled')
      expect((await nurse.patch(`/api/appointments/${a.id}`, { version: 3, durationMin: 30 })).status).toBe(422)
    },
  )
})

describe('who sees appointments', () => {
  it("when a surgeon opens their own patient's appointments, then they are listed; another surgeon's patient is refused", async () => {
    await book().expect(201)
    const own = await new Client(t.app).mustSignIn(f.surgeon.email, f.surgeon.password)
    expect((await own.get(`/api/referrals/${f.referralId}/appointments`).expect(200)).body.rows).toHaveLength(1)
    const other = await makeStaff('surgeon')
    const c = await new Client(t.app).mustSignIn(other.email, other.password)
    const res = await c.get(`/api/referrals/${f.referralId}/appointments`)
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('not_your_patient')
  })
})

describe('reminders', () => {
  it('when the reminder falls due, then one reminder goes, and later passes never send it again', async () => {
    const a = (await book().expect(201)).body.appointment
    await send()
    const start = Date.parse(a.startsAt)
    const opts = { sequelize: t.sequelize, config: t.config }
    // Three days before: not yet (REMINDER_DAYS_BEFORE defaults to 2).
    expect((await drainOutbox({ ...opts, now: new Date(start - 3 * 86_400_000) })).reminders).toBe(0)
    expect((await drainOutbox({ ...opts, now: new Date(start - 36 * 3_600_000) })).reminders).toBe(1)
    expect((await drainOutbox({ ...opts, now: new Date(start - 30 * 3_600_000) })).reminders).toBe(0)
    const subjects = (await mail.to(f.email)).map((m) => m.subject)
    expect(subjects).toHaveLength(2)
    expect(subjects[1]).toMatch(/^Your hospital appointment is coming up: /)
  })
})
