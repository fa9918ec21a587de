import { Op, UniqueConstraintError, type Sequelize } from 'sequelize'
import type { Config } from '../config'
import { Appointment, Patient } from '../models/index'
import { enqueueMessage } from './outbox'
import { snapshotOf } from './appointmentView'
import { unitOfWork } from '../unitOfWork'

const DAY_MS = 86_400_000

/**
 * When the reminder falls due: REMINDER_DAYS_BEFORE days ahead of the visit. Null when that
 * moment has already passed at booking (the booking e-mail has just gone) or reminders are off.
 */
export function reminderDueAt(config: Config, startsAt: Date, now: Date): Date | null {
  const days = config.outbox.reminderDaysBefore
  if (days <= 0) return null
  const due = new Date(startsAt.getTime() - days * DAY_MS)
  return due > now ? due : null
}

/**
 * Puts each due reminder in the outbox once: the appointment row is locked and its remind_at
 * cleared in the same transaction, and the dedupe key (appointment + its calendar sequence)
 * refuses a second copy even if two workers race here.
 */
export async function queueDueReminders(sequelize: Sequelize, config: Config, now: Date): Promise<number> {
  const due = await Appointment.findAll({
    where: { remindAt: { [Op.lte]: now }, startsAt: { [Op.gt]: now }, status: { [Op.ne]: 'cancelled' } },
    attributes: ['id'],
    order: [['remindAt', 'ASC']],
    limit: 100,
    raw: true,
  })
  let queued = 0
  for (const { id } of due) {
    const done = await unitOfWork(sequelize, { idempotent: true }, async (t) => {
      const a = await Appointment.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
      if (!a || !a.remindAt || a.remindAt > now || a.status === 'cancelled') return false
      const patient = await Patient.findByPk(a.patientId, { transaction: t, raw: true })
      await a.update({ remindAt: null }, { transaction: t, silent: true })
      if (!patient) return false
      try {
        const m = await enqueueMessage(t, config, {
          kind: 'reminder',
          snapshot: snapshotOf(a.get({ plain: true }), patient),
          referralId: a.referralId,
          patientId: a.patientId,
          dedupeKey: `reminder:${a.id}:${a.sequence}`,
        })
        return m !== null
      } catch (err) {
        if (err instanceof UniqueConstraintError) return false
        throw err
      }
    })
    if (done) queued += 1
  }
  return queued
}
