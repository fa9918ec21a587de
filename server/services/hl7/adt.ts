import type { Hl7Message } from '@medplum/core'
import { Op, type Transaction } from 'sequelize'
import { readHl7Date, type Hl7Change } from '../../../shared/hl7'
import type { Config } from '../../config'
import { Patient, Referral } from '../../models/index'
import { changedFields, recordAudit, type Actor } from '../audit'
import { refreshScreening } from '../screening'
import { Hl7Problem } from './ack'
import { mrnFromPid } from './oruRead'
import { worklistChanged } from '../worklistCounts'

/** PID-8 administrative sex (HL7 v2 table 0001, from memory): the two the clinical thresholds use. */
const SEX: Record<string, 'female' | 'male'> = { F: 'female', M: 'male' }

/**
 * ADT^A08: the patient administration system's name, date of birth and sex, audited. A changed
 * sex or date of birth re-runs the screening of every open episode, whose thresholds depend on them.
 */
export async function storeAdt(
  config: Config,
  msg: Hl7Message,
  ctx: { messageId: number; actor: Actor },
  t: Transaction,
): Promise<Hl7Change[]> {
  const pid = msg.getSegment('PID')
  if (!pid) throw new Hl7Problem('AR', 'missing-pid', 'the message has no PID segment', '100', { segment: 'PID' })
  const mrn = mrnFromPid(pid, config.hl7.assigningAuthority)
  const patient = await Patient.findOne({ where: { mrn }, transaction: t, lock: t.LOCK.UPDATE })
  if (!patient) throw new Hl7Problem('AE', 'unknown-mrn', `no patient has MRN ${mrn}`, '204', { segment: 'PID', field: 3 })
  const family = pid.getComponent(5, 1).trim()
  const given = pid.getComponent(5, 2).trim()
  const dobText = pid.getComponent(7, 1).trim()
  const sexText = pid.getComponent(8, 1).trim().toUpperCase()
  const dob = dobText ? readHl7Date(dobText) : patient.dateOfBirth
  if (!dob || dob > new Date().toISOString().slice(0, 10))
    throw new Hl7Problem('AE', 'bad-date', `PID-7 date of birth "${dobText}" is not a past date`, '102', { segment: 'PID', field: 7 })
  const sex = sexText ? SEX[sexText] : patient.sex
  if (!sex)
    throw new Hl7Problem(
      'AE',
      'unsupported-sex',
      `PID-8 sex "${sexText}" is not F or M: the screening thresholds need one of them; a nurse updates the record`,
      '103',
      { segment: 'PID', field: 8 },
    )
  const before = { givenName: patient.givenName, familyName: patient.familyName, dateOfBirth: patient.dateOfBirth, sex: patient.sex }
  const after = {
    givenName: given.slice(0, 80) || before.givenName,
    familyName: family.slice(0, 80) || before.familyName,
    dateOfBirth: dob,
    sex,
  }
  const diff = changedFields(before, after)
  if (!Object.keys(diff.after).length) return []
  worklistChanged('patient', t)
  await patient.update({ ...after, version: patient.version + 1 }, { transaction: t })
  const changes: Hl7Change[] = [{ kind: 'patient-updated', patientId: patient.id, detail: Object.keys(diff.after).join(', ') }]
  await recordAudit(t, ctx.actor, {
    action: 'hl7-demographics',
    entity: 'patient',
    entityId: patient.id,
    patientId: patient.id,
    before: diff.before,
    after: { ...diff.after, hl7MessageId: ctx.messageId },
  })
  if (before.sex !== sex || before.dateOfBirth !== dob) {
    const open = await Referral.findAll({
      where: { patientId: patient.id, stage: { [Op.notIn]: ['closed', 'withdrawn'] } },
      transaction: t,
      lock: t.LOCK.UPDATE,
    })
    for (const r of open) {
      await refreshScreening(r, sex, t)
      changes.push({ kind: 'rescreened', referralId: r.id, patientId: patient.id })
    }
  }
  return changes
}
