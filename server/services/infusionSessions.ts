import type { InferAttributes } from 'sequelize'
import { Op, type Sequelize } from 'sequelize'
import type { Config } from '../config'
import { Appointment, InfusionSession } from '../models/index'
import { localDate, localTime, peakOverlap, zonedToUtc } from '../../shared/appointments'
import type { CreateInfusionSessionInput, SessionRangeQuery, UpdateInfusionSessionInput } from '../../shared/schemas/appointments'
import { addDays } from '../../shared/pathway'
import type { InfusionSessionView } from '../../shared/appointments/views'
import type { Rows } from '../../shared/types'
import { Conflict, Invalid, NotFound } from '../errors'
import { LIMITS, windowTooLong } from '../../shared/limits'
import { recordAudit, changedFields } from './audit'
import { staleVersion, type Viewer } from './viewer'
import { clinicToday } from './clinicDay'

type Row = InferAttributes<InfusionSession>

/** Sessions are entered and shown in the clinic's wall-clock time; stored as instants. */
function view(s: Row, tz: string, booked: { startsAt: Date; endsAt: Date }[]): InfusionSessionView {
  const span = (x: { startsAt: Date; endsAt: Date }) => ({ startMs: new Date(x.startsAt).getTime(), endMs: new Date(x.endsAt).getTime() })
  const peak = peakOverlap(booked.map(span), span(s))
  return {
    id: s.id,
    date: localDate(s.startsAt, tz),
    startTime: localTime(s.startsAt, tz),
    endTime: localTime(s.endsAt, tz),
    timeZone: tz,
    startsAt: s.startsAt.toISOString(),
    endsAt: s.endsAt.toISOString(),
    chairs: s.chairs,
    location: s.location,
    bookings: booked.length,
    peakChairsInUse: peak,
    full: peak >= s.chairs,
    version: s.version,
  }
}

async function bookingsOf(ids: number[]) {
  if (!ids.length) return []
  return Appointment.findAll({
    where: { infusionSessionId: ids, status: { [Op.ne]: 'cancelled' } },
    attributes: ['infusionSessionId', 'startsAt', 'endsAt'],
    raw: true,
  })
}

export async function listInfusionSessions(config: Config, q: SessionRangeQuery): Promise<Rows<InfusionSessionView>> {
  const tz = config.clinic.timeZone
  const fromDay = q.from || clinicToday()
  const toDay = q.to || addDays(fromDay, 28)
  const tooLong = windowTooLong(fromDay, toDay, LIMITS.infusionSessionDays, 'The session window')
  if (tooLong) throw new Invalid(tooLong, { to: `must be within ${LIMITS.infusionSessionDays} days of from` })
  const from = zonedToUtc(fromDay, '00:00', tz)
  const to = zonedToUtc(addDays(toDay, 1), '00:00', tz)
  const rows = await InfusionSession.findAll({
    where: { startsAt: { [Op.gte]: from, [Op.lt]: to } },
    order: [['startsAt', 'ASC']],
    raw: true,
  })
  const booked = await bookingsOf(rows.map((r) => r.id))
  return {
    rows: rows.map((r) =>
      view(
        r,
        tz,
        booked.filter((b) => b.infusionSessionId === r.id),
      ),
    ),
  }
}

function instants(date: string, startTime: string, endTime: string, tz: string) {
  const startsAt = zonedToUtc(date, startTime, tz)
  const endsAt = zonedToUtc(date, endTime, tz)
  if (endsAt <= startsAt) throw new Invalid('endTime must be after startTime', { endTime: 'must be after startTime' })
  return { startsAt, endsAt }
}

export async function createInfusionSession(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  input: CreateInfusionSessionInput,
): Promise<InfusionSessionView> {
  const tz = config.clinic.timeZone
  const times = instants(input.date, input.startTime, input.endTime, tz)
  const row = await sequelize.transaction(async (t) => {
    const s = await InfusionSession.create(
      { ...times, chairs: input.chairs, location: input.location, createdBy: viewer.userId },
      { transaction: t },
    )
    await recordAudit(t, viewer, {
      action: 'create',
      entity: 'infusion-session',
      entityId: s.id,
      after: { ...times, chairs: s.chairs, location: s.location },
    })
    return s.get({ plain: true })
  })
  return view(row, tz, [])
}

/**
 * Chairs may not drop below the most patients booked at once, and booked patients must still
 * fit inside the session's new hours; otherwise someone would lose a chair without being told.
 */
export async function updateInfusionSession(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  id: number,
  input: UpdateInfusionSessionInput,
): Promise<InfusionSessionView> {
  const tz = config.clinic.timeZone
  const row = await sequelize.transaction(async (t) => {
    const s = await InfusionSession.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
    if (!s) throw new NotFound('Infusion session')
    if (s.version !== input.version) throw staleVersion('This infusion session')
    const before = { startsAt: s.startsAt.toISOString(), endsAt: s.endsAt.toISOString(), chairs: s.chairs, location: s.location }
    const times = instants(
      input.date ?? localDate(s.startsAt, tz),
      input.startTime ?? localTime(s.startsAt, tz),
      input.endTime ?? localTime(s.endsAt, tz),
      tz,
    )
    const chairs = input.chairs ?? s.chairs
    const booked = await Appointment.findAll({
      where: { infusionSessionId: id, status: { [Op.ne]: 'cancelled' } },
      transaction: t,
      raw: true,
    })
    if (booked.some((b) => b.startsAt < times.startsAt || b.endsAt > times.endsAt)) {
      throw new Conflict('Patients are booked outside the new hours; move them first', 'session_has_bookings', {
        startTime: 'would leave booked patients outside the session',
      })
    }
    const peak = peakOverlap(
      booked.map((b) => ({ startMs: b.startsAt.getTime(), endMs: b.endsAt.getTime() })),
      { startMs: times.startsAt.getTime(), endMs: times.endsAt.getTime() },
    )
    if (chairs < peak)
      throw new Conflict(`${peak} patients are booked at the same time; chairs cannot go below that`, 'chairs_in_use', {
        chairs: `must be at least ${peak}`,
      })
    await s.update({ ...times, chairs, location: input.location ?? s.location, version: s.version + 1 }, { transaction: t })
    const after = { startsAt: s.startsAt.toISOString(), endsAt: s.endsAt.toISOString(), chairs: s.chairs, location: s.location }
    await recordAudit(t, viewer, { action: 'update', entity: 'infusion-session', entityId: id, ...changedFields(before, after) })
    return { session: s.get({ plain: true }), booked }
  })
  return view(row.session, tz, row.booked)
}
