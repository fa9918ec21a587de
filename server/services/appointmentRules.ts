import type { SlotSuggestion } from '../../shared/appointments/views'
import { Op, type Transaction } from 'sequelize'
import { Appointment, InfusionSession } from '../models/index'
import { freeSlots, localDate, localTime, peakOverlap, type SessionLoad, type Span } from '../../shared/appointments'
import { Conflict } from '../errors'

const ACTIVE = { [Op.ne]: 'cancelled' } as const
const SUGGEST_WEEKS = 8

const span = (a: { startsAt: Date; endsAt: Date }): Span => ({
  startMs: new Date(a.startsAt).getTime(),
  endMs: new Date(a.endsAt).getTime(),
})

/**
 * A patient is in one place at a time. The caller holds the patient row's lock, so two
 * bookings for the same patient cannot both pass this check.
 */
export async function assertNoDoubleBooking(
  t: Transaction,
  patientId: number,
  wanted: Span,
  timeZone: string,
  excludeId?: number,
): Promise<void> {
  const clash = await Appointment.findOne({
    where: {
      patientId,
      status: ACTIVE,
      startsAt: { [Op.lt]: new Date(wanted.endMs) },
      endsAt: { [Op.gt]: new Date(wanted.startMs) },
      ...(excludeId ? { id: { [Op.ne]: excludeId } } : {}),
    },
    transaction: t,
    raw: true,
  })
  if (clash) {
    throw new Conflict(
      `The patient already has an appointment on ${localDate(clash.startsAt, timeZone)} from ` +
        `${localTime(clash.startsAt, timeZone)} to ${localTime(clash.endsAt, timeZone)} that overlaps this time`,
      'double_booked',
      { startsAt: 'overlaps another appointment of this patient' },
      { clashingAppointmentId: clash.id },
    )
  }
}

async function sessionLoads(t: Transaction, sessions: InfusionSession[], excludeId?: number): Promise<SessionLoad[]> {
  if (!sessions.length) return []
  const bookings = await Appointment.findAll({
    where: { infusionSessionId: sessions.map((s) => s.id), status: ACTIVE, ...(excludeId ? { id: { [Op.ne]: excludeId } } : {}) },
    attributes: ['infusionSessionId', 'startsAt', 'endsAt'],
    transaction: t,
    raw: true,
  })
  return sessions.map((s) => ({
    id: s.id,
    chairs: s.chairs,
    ...span(s),
    bookings: bookings.filter((b) => b.infusionSessionId === s.id).map(span),
  }))
}

/** The next free chairs from the wanted time on, to offer with a refusal. */
async function suggestions(
  t: Transaction,
  patientId: number,
  wanted: Span,
  durationMin: number,
  timeZone: string,
  excludeId?: number,
): Promise<SlotSuggestion[]> {
  const sessions = await InfusionSession.findAll({
    where: {
      endsAt: { [Op.gt]: new Date(wanted.startMs) },
      startsAt: { [Op.lt]: new Date(wanted.startMs + SUGGEST_WEEKS * 7 * 86_400_000) },
    },
    order: [['startsAt', 'ASC']],
    limit: 60,
    transaction: t,
  })
  const busy = await Appointment.findAll({
    where: {
      patientId,
      status: ACTIVE,
      endsAt: { [Op.gt]: new Date(wanted.startMs) },
      ...(excludeId ? { id: { [Op.ne]: excludeId } } : {}),
    },
    attributes: ['startsAt', 'endsAt'],
    transaction: t,
    raw: true,
  })
  const loads = await sessionLoads(t, sessions, excludeId)
  const byId = new Map(sessions.map((s) => [s.id, s]))
  return freeSlots(loads, durationMin, Math.max(wanted.startMs, Date.now()), busy.map(span)).map((f) => {
    const at = new Date(f.startMs)
    return {
      sessionId: f.sessionId,
      startsAt: at.toISOString(),
      endsAt: new Date(f.endMs).toISOString(),
      date: localDate(at, timeZone),
      time: localTime(at, timeZone),
      location: byId.get(f.sessionId)!.location,
    }
  })
}

/**
 * An iron infusion needs a chair: the visit must lie inside an infusion session whose chairs
 * are not all taken at that time. Candidate sessions are locked, so two bookings cannot take
 * the last chair together. Refusals carry the next free slots in error.details.suggestions.
 */
export async function takeInfusionChair(
  t: Transaction,
  patientId: number,
  wanted: Span,
  durationMin: number,
  timeZone: string,
  excludeId?: number,
): Promise<number> {
  const containing = await InfusionSession.findAll({
    where: { startsAt: { [Op.lte]: new Date(wanted.startMs) }, endsAt: { [Op.gte]: new Date(wanted.endMs) } },
    order: [
      ['startsAt', 'ASC'],
      ['id', 'ASC'],
    ],
    transaction: t,
    lock: t.LOCK.UPDATE,
  })
  for (const load of await sessionLoads(t, containing, excludeId)) {
    if (peakOverlap(load.bookings, wanted) < load.chairs) return load.id
  }
  const offered = await suggestions(t, patientId, wanted, durationMin, timeZone, excludeId)
  if (!containing.length) {
    throw new Conflict(
      "Iron infusions are given in the infusion unit's sessions, and no session covers this time",
      'outside_session',
      { startsAt: 'is not inside an infusion session' },
      { suggestions: offered },
    )
  }
  throw new Conflict(
    'Every chair in the infusion session is taken at this time',
    'session_full',
    { startsAt: 'no free chair in this session' },
    { suggestions: offered },
  )
}
