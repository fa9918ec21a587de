import type { InferAttributes } from 'sequelize'
import type { Sequelize } from 'sequelize'
import { Appointment, AppointmentTask, Patient } from '../models/index'
import { KIND_INFO } from '../../shared/appointments'
import type { TaskQuery } from '../../shared/schemas/appointments'
import type { CompletedTask, PatientTask } from '../../shared/appointments/views'
import type { Rows } from '../../shared/types'
import { Conflict, NotFound } from '../errors'
import { recordAudit } from './audit'
import type { Viewer } from './viewer'
import { isoOrNull } from './viewer'

/** Patients' requests waiting for a nurse, oldest first so nobody waits longest by accident. */
export async function listTasks(q: TaskQuery): Promise<Rows<PatientTask>> {
  const rows = await AppointmentTask.findAll({
    where: { status: q.status },
    include: [
      { model: Patient, as: 'patient', attributes: ['id', 'givenName', 'familyName', 'mrn', 'phone'] },
      { model: Appointment, as: 'appointment', attributes: ['id', 'kind', 'startsAt', 'location', 'status'] },
    ],
    order: [
      ['createdAt', q.status === 'open' ? 'ASC' : 'DESC'],
      ['id', 'ASC'],
    ],
    limit: 200,
  })
  return {
    rows: rows.map((r) => {
      const x = r.get({ plain: true }) as unknown as InferAttributes<AppointmentTask> & {
        patient: { id: number; givenName: string; familyName: string; mrn: string; phone: string | null }
        appointment: InferAttributes<Appointment>
      }
      return {
        id: x.id,
        kind: x.kind,
        status: x.status,
        message: x.message,
        createdAt: isoOrNull(x.createdAt)!,
        doneAt: isoOrNull(x.doneAt),
        referralId: x.referralId,
        patient: { id: x.patient.id, name: `${x.patient.givenName} ${x.patient.familyName}`, mrn: x.patient.mrn, phone: x.patient.phone },
        appointment: {
          id: x.appointment.id,
          kind: x.appointment.kind,
          kindLabel: KIND_INFO[x.appointment.kind].label,
          startsAt: isoOrNull(x.appointment.startsAt)!,
          location: x.appointment.location,
          status: x.appointment.status,
        },
      }
    }),
  }
}

export async function completeTask(sequelize: Sequelize, viewer: Viewer, id: number): Promise<CompletedTask> {
  await sequelize.transaction(async (t) => {
    const task = await AppointmentTask.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
    if (!task) throw new NotFound('Task')
    if (task.status === 'done') throw new Conflict('This task is already done', 'task_done')
    await task.update({ status: 'done', doneAt: new Date(), doneBy: viewer.userId }, { transaction: t })
    await recordAudit(t, viewer, {
      action: 'complete',
      entity: 'appointment-task',
      entityId: id,
      patientId: task.patientId,
      after: { status: 'done' },
    })
  })
  return { id, status: 'done' }
}
