import type { Transaction } from 'sequelize'
import {
  Appointment,
  AppointmentEvent,
  AppointmentTask,
  InfusionSession,
  OutboxMessage,
  Patient,
  Referral,
  User,
} from '../../server/models/index'
import { zonedToUtc, type AppointmentKind, type AppointmentStatus } from '../../shared/appointments'
import { addDays } from '../../shared/pathway'
import { clinicToday } from '../../server/services/clinicDay'
import { snapshotOf } from '../../server/services/appointmentView'
import { subjectFor } from '../../server/mail/templates/content'
import { DEMO_HOSPITAL } from './hospital'

const TZ = DEMO_HOSPITAL.timeZone
const UNIT = 'Day Treatment Unit, Level 2 (demo)'
const DAY_MS = 86_400_000

/** Tuesday and Thursday mornings for the next four weeks: the demo infusion unit's sessions. */
function sessionDates(): string[] {
  const out: string[] = []
  for (let i = 1; i <= 28; i++) {
    const d = addDays(clinicToday(), i)
    const weekday = new Date(`${d}T12:00:00Z`).getUTCDay()
    if (weekday === 2 || weekday === 4) out.push(d)
  }
  return out
}

interface DemoVisit {
  family: string
  kind: AppointmentKind
  date: string | 'session1' | 'session2'
  time: string
  minutes: number
  place: string
  status: AppointmentStatus
  rebookNote?: string
}

const VISITS: DemoVisit[] = [
  {
    family: 'Hawthornley',
    kind: 'anaemia-clinic',
    date: addDays(clinicToday(), 3),
    time: '10:00',
    minutes: 30,
    place: 'Anaemia Clinic, Outpatients B (demo)',
    status: 'booked',
  },
  {
    family: 'Brackenmoor',
    kind: 'anaemia-clinic',
    date: addDays(clinicToday(), 5),
    time: '14:00',
    minutes: 30,
    place: 'Anaemia Clinic, Outpatients B (demo)',
    status: 'confirmed',
  },
  { family: 'Wychwood', kind: 'iron-infusion', date: 'session1', time: '09:30', minutes: 60, place: UNIT, status: 'booked' },
  {
    family: 'Furzebank',
    kind: 'iron-infusion',
    date: 'session2',
    time: '10:30',
    minutes: 60,
    place: UNIT,
    status: 'rebook-requested',
    rebookNote: 'Could it be an afternoon? I work mornings that week.',
  },
  {
    family: 'Rushmere',
    kind: 'recheck-bloods',
    date: addDays(clinicToday(), 8),
    time: '08:45',
    minutes: 15,
    place: 'Phlebotomy, Level 0 (demo)',
    status: 'booked',
  },
]

/**
 * Infusion sessions and a handful of booked visits for invented patients. Their booking
 * e-mails are recorded as already sent: loading the demo must not mail anyone.
 */
export async function loadDemoAppointments(t: Transaction): Promise<void> {
  const admin = await User.findOne({ where: { email: 'admin@ferrolane.test' }, transaction: t, raw: true })
  const nurse = await User.findOne({ where: { email: 'nurse@ferrolane.test' }, transaction: t, raw: true })
  const dates = sessionDates()
  await InfusionSession.bulkCreate(
    dates.map((d) => ({
      startsAt: zonedToUtc(d, '09:00', TZ),
      endsAt: zonedToUtc(d, '12:30', TZ),
      chairs: 6,
      location: UNIT,
      createdBy: admin?.id ?? null,
    })),
    { transaction: t },
  )
  const sessions = await InfusionSession.findAll({ order: [['startsAt', 'ASC']], transaction: t, raw: true })
  const now = Date.now()
  for (const v of VISITS) {
    const patient = await Patient.findOne({ where: { familyName: v.family }, transaction: t, raw: true })
    const referral = patient && (await Referral.findOne({ where: { patientId: patient.id }, transaction: t, raw: true }))
    if (!patient || !referral) continue
    const session = v.date === 'session1' ? sessions[0] : v.date === 'session2' ? sessions[1] : undefined
    const date = session ? dates[v.date === 'session1' ? 0 : 1]! : (v.date as string)
    const startsAt = zonedToUtc(date, v.time, TZ)
    const remind = new Date(startsAt.getTime() - 2 * DAY_MS)
    const a = await Appointment.create(
      {
        referralId: referral.id,
        patientId: patient.id,
        kind: v.kind,
        startsAt,
        endsAt: new Date(startsAt.getTime() + v.minutes * 60_000),
        durationMin: v.minutes,
        location: v.place,
        infusionSessionId: session?.id ?? null,
        status: v.status,
        confirmedAt: v.status === 'confirmed' ? new Date(now - 3_600_000) : null,
        remindAt: remind.getTime() > now ? remind : null,
        createdBy: nurse?.id ?? null,
      },
      { transaction: t },
    )
    const bookedAt = new Date(now - 2 * DAY_MS)
    await AppointmentEvent.create(
      {
        appointmentId: a.id,
        kind: 'booked',
        startsAt,
        durationMin: v.minutes,
        location: v.place,
        note: null,
        userId: nurse?.id ?? null,
        at: bookedAt,
      },
      { transaction: t },
    )
    const snapshot = snapshotOf(a.get({ plain: true }), patient)
    await OutboxMessage.create(
      {
        kind: 'booking',
        appointmentId: a.id,
        referralId: referral.id,
        patientId: patient.id,
        toAddress: patient.email ?? 'demo@example.test',
        subject: subjectFor('booking', snapshot, { ...DEMO_HOSPITAL }),
        payload: snapshot,
        dedupeKey: null,
        status: 'sent',
        attempts: 1,
        nextAttemptAt: bookedAt,
        sentAt: bookedAt,
        smtpMessageId: `<demo-${a.id}@ferrolane>`,
      },
      { transaction: t },
    )
    if (v.status === 'confirmed')
      await AppointmentEvent.create(
        { appointmentId: a.id, kind: 'confirmed', startsAt: null, durationMin: null, location: null, note: null, userId: null },
        { transaction: t },
      )
    if (v.rebookNote) {
      await AppointmentEvent.create(
        {
          appointmentId: a.id,
          kind: 'rebook-requested',
          startsAt: null,
          durationMin: null,
          location: null,
          note: v.rebookNote,
          userId: null,
        },
        { transaction: t },
      )
      await AppointmentTask.create(
        { kind: 'rebook-request', appointmentId: a.id, referralId: referral.id, patientId: patient.id, message: v.rebookNote },
        { transaction: t },
      )
    }
  }
}
