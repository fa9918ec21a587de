import { InfusionSession, Patient } from '../../server/models/index'
import { drainOutbox } from '../../server/services/outboxWorker'
import { zonedToUtc } from '../../shared/appointments'
import { addDays, todayIso } from '../../shared/pathway'
import { makeStaff, type StaffFixture } from './factories'
import { makePatient, makeProcedure, makeReferral } from './pathwayFactories'
import type { Maildev, ReceivedMail } from './mail'
import { Client } from './agent'
import { cleanDatabase, type TestApp } from './app'

export const CLINIC_TZ = 'Europe/London'

/** A date next July: always ahead, within two years, and in British Summer Time (UTC+1). */
export function summerDay(offsetDays = 0): string {
  return addDays(`${new Date().getFullYear() + 1}-07-13`, offsetDays)
}

/** A clinic wall-clock time as the ISO instant the API takes. */
export function at(date: string, hhmm: string): string {
  return zonedToUtc(date, hhmm, CLINIC_TZ).toISOString()
}

export const inDays = (days: number) => addDays(todayIso(), days)

let n = 0
export interface BookingFixture {
  nurse: StaffFixture
  surgeon: StaffFixture
  patientId: number
  referralId: number
  email: string
}

/** A nurse, a surgeon, and one patient with an e-mail address on an open episode. */
export async function bookingFixture(
  o: { givenName?: string; email?: string | null; surgeon?: StaffFixture } = {},
): Promise<BookingFixture> {
  n += 1
  const nurse = await makeStaff('nurse')
  const surgeon = o.surgeon ?? (await makeStaff('surgeon'))
  const procedure = await makeProcedure()
  const patient = await makePatient({ givenName: o.givenName ?? 'Rowan', familyName: `Bramblewick${n}` })
  const email = o.email === undefined ? `rowan.${n}.${Date.now()}@example.test` : o.email
  await Patient.update({ email }, { where: { id: patient.id } })
  const referral = await makeReferral({ patientId: patient.id, procedureId: procedure.id, surgeonId: surgeon.id }, { stage: 'treating' })
  return { nurse, surgeon, patientId: patient.id, referralId: referral.id, email: email ?? '' }
}

/**
 * A clean database and mailbox, a 30-minute anaemia clinic appointment booked by a nurse (signed in
 * as `nurse`) at 10:00 on a summer day, its confirmation e-mail sent, and the patient's browser: no
 * account, only the CSRF token of an anonymous session. `booked` is the booking's answer.
 */
export async function bookedAppointment(t: TestApp, mail: Maildev, o: { givenName: string; location: string }) {
  await cleanDatabase(t.sequelize)
  await mail.clear()
  const f = await bookingFixture({ givenName: o.givenName })
  const nurse = await new Client(t.app).mustSignIn(f.nurse.email, f.nurse.password)
  const booked = await nurse.post('/api/appointments', {
    referralId: f.referralId,
    kind: 'anaemia-clinic',
    startsAt: at(summerDay(), '10:00'),
    durationMin: 30,
    location: o.location,
  })
  const appointmentId: number = booked.body.appointment?.id
  await drainOutbox({ sequelize: t.sequelize, config: t.config })
  const patient = new Client(t.app)
  await patient.fetchCsrf()
  return { f, nurse, booked, appointmentId, patient }
}

/** An infusion session straight in the database, in clinic time. */
export async function makeSession(date: string, start = '09:00', end = '12:00', chairs = 2, location = 'Day Treatment Unit, Level 2') {
  return InfusionSession.create({
    startsAt: zonedToUtc(date, start, CLINIC_TZ),
    endsAt: zonedToUtc(date, end, CLINIC_TZ),
    chairs,
    location,
    createdBy: null,
  })
}

/** The reply token from the link in a received e-mail's text part. */
export function replyTokenIn(mail: ReceivedMail): string {
  const m = /\/reply\/([A-Za-z0-9_-]{43})/.exec(mail.text)
  if (!m) throw new Error(`no reply link in "${mail.subject}"`)
  return m[1]!
}
