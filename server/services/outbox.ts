import type { OutboxRow, QueuedMessage } from '../../shared/appointments/views'
import type { Rows } from '../../shared/types'
import type { InferAttributes } from 'sequelize'
import { Op, type Transaction, type WhereOptions } from 'sequelize'
import { OutboxMessage, Patient } from '../models/index'
import type { Config } from '../config'
import type { MessageKind } from '../../shared/appointments'
import type { OutboxQuery } from '../../shared/schemas/appointments'
import type { AppointmentSnapshot } from '../mail/snapshot'
import { clinicContact } from '../mail/compose'
import { subjectFor } from '../mail/templates/content'
import { isoOrNull } from './viewer'

export interface Enqueue {
  kind: MessageKind
  snapshot: AppointmentSnapshot
  referralId: number
  patientId: number
  dedupeKey?: string
}

/**
 * Writes the message inside the caller's transaction: it exists exactly when the change it
 * reports was committed. Returns null when the patient has no e-mail address on file.
 */
export async function enqueueMessage(t: Transaction, config: Config, m: Enqueue): Promise<QueuedMessage | null> {
  if (!m.snapshot.email) return null
  const row = await OutboxMessage.create(
    {
      kind: m.kind,
      appointmentId: m.snapshot.appointmentId,
      referralId: m.referralId,
      patientId: m.patientId,
      toAddress: m.snapshot.email,
      subject: subjectFor(m.kind, m.snapshot, clinicContact(config)),
      payload: m.snapshot,
      dedupeKey: m.dedupeKey ?? null,
      nextAttemptAt: new Date(),
    },
    { transaction: t },
  )
  return { id: row.id, status: row.status }
}

/** What staff see of each patient message: who it went to, what it was and how it went. */
export async function listOutbox(q: OutboxQuery): Promise<Rows<OutboxRow>> {
  const where: WhereOptions<OutboxMessage> = {}
  if (q.status) Object.assign(where, { status: q.status })
  if (q.referralId) Object.assign(where, { referralId: q.referralId })
  const rows = await OutboxMessage.findAll({
    where,
    include: [{ model: Patient, as: 'patient', attributes: ['id', 'givenName', 'familyName', 'mrn'] }],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 200,
  })
  return {
    rows: rows.map((r) => {
      const m = r.get({ plain: true }) as unknown as InferAttributes<OutboxMessage> & {
        patient?: { id: number; givenName: string; familyName: string; mrn: string }
      }
      return {
        id: m.id,
        kind: m.kind,
        status: m.status,
        appointmentId: m.appointmentId,
        referralId: m.referralId,
        patient: m.patient ? { id: m.patient.id, name: `${m.patient.givenName} ${m.patient.familyName}`, mrn: m.patient.mrn } : null,
        toAddress: m.toAddress,
        subject: m.subject,
        attempts: m.attempts,
        lastError: m.lastError ?? null,
        nextAttemptAt: m.status === 'queued' ? isoOrNull(m.nextAttemptAt) : null,
        sentAt: isoOrNull(m.sentAt),
        createdAt: isoOrNull(m.createdAt)!,
      }
    }),
  }
}

/** Messages about these appointments, newest first, for the appointment list. */
export async function messagesFor(appointmentIds: number[]) {
  if (!appointmentIds.length) return []
  return OutboxMessage.findAll({ where: { appointmentId: { [Op.in]: appointmentIds } }, order: [['id', 'ASC']], raw: true })
}
