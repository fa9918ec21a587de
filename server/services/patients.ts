import { Op, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize'
import { Patient, PatientMeasurement, Procedure, Referral } from '../models/index'
import type { CreatePatientInput, UpdatePatientInput } from '../../shared/schemas/patients'
import { ageOn, STAGE_LABELS } from '../../shared/pathway'
import type { Sex } from '../../shared/clinical'
import type { PatientRecord, PatientSummary, PatientView } from '../../shared/pathway/views'
import { recordAudit, changedFields, type Actor } from './audit'
import { isoOrNull, staleVersion, type Viewer } from './viewer'
import { Conflict, Forbidden, Invalid, NotFound } from '../errors'
import { clinicToday } from './clinicDay'
import { worklistChanged } from './worklistCounts'
import { unitOfWork } from '../unitOfWork'
import { maySeeEpisode, seesOwnPatientsOnly } from '../../shared/permissions'

/** The latest height and the latest weight, each with the date it was measured. */
export async function currentBody(patientId: number, t?: Transaction) {
  const latest = (column: 'heightCm' | 'weightKg') =>
    PatientMeasurement.findOne({
      where: { patientId, [column]: { [Op.ne]: null } },
      order: [
        ['measuredAt', 'DESC'],
        ['id', 'DESC'],
      ],
      transaction: t,
    })
  const [h, w] = await Promise.all([latest('heightCm'), latest('weightKg')])
  return {
    heightCm: h?.heightCm ?? null,
    heightMeasuredAt: isoOrNull(h?.measuredAt),
    weightKg: w?.weightKg ?? null,
    weightMeasuredAt: isoOrNull(w?.measuredAt),
  }
}

export async function toPatientView(p: Patient, t?: Transaction): Promise<PatientView> {
  return {
    id: p.id,
    mrn: p.mrn,
    givenName: p.givenName,
    familyName: p.familyName,
    dateOfBirth: p.dateOfBirth,
    ageYears: ageOn(p.dateOfBirth, clinicToday()),
    sex: p.sex,
    email: p.email,
    phone: p.phone,
    gpPractice: p.gpPractice,
    notes: p.notes,
    ...(await currentBody(p.id, t)),
    version: p.version,
    createdAt: p.createdAt.toISOString(),
    updatedAt: p.updatedAt.toISOString(),
  }
}

function duplicateMrn(mrn: string): Conflict {
  return new Conflict(`A patient with the hospital number ${mrn} is already registered`, 'duplicate_mrn', { mrn: 'is already registered' })
}

function assertMeasuredAfterBirth(measuredAt: Date | null | undefined, dateOfBirth: string): void {
  if (measuredAt && measuredAt.toISOString().slice(0, 10) < dateOfBirth) {
    throw new Invalid('Measured at must not be before the date of birth', { measuredAt: 'must not be before the date of birth' })
  }
}

async function appendMeasurement(
  t: Transaction,
  actor: Actor,
  patientId: number,
  m: { heightCm?: number | null; weightKg?: number | null; measuredAt?: Date | null },
) {
  if (m.heightCm == null && m.weightKg == null) return
  await PatientMeasurement.create(
    {
      patientId,
      heightCm: m.heightCm ?? null,
      weightKg: m.weightKg ?? null,
      measuredAt: m.measuredAt ?? new Date(),
      recordedBy: actor.userId,
    },
    { transaction: t },
  )
}

export async function createPatient(sequelize: Sequelize, actor: Actor, input: CreatePatientInput): Promise<PatientView> {
  try {
    assertMeasuredAfterBirth(input.measuredAt, input.dateOfBirth)
    return await unitOfWork(sequelize, { idempotent: true }, async (t) => {
      worklistChanged('patient', t)
      const p = await Patient.create(
        {
          mrn: input.mrn,
          givenName: input.givenName,
          familyName: input.familyName,
          dateOfBirth: input.dateOfBirth,
          sex: input.sex as Sex,
          email: input.email ?? null,
          phone: input.phone ?? null,
          gpPractice: input.gpPractice ?? null,
          notes: input.notes ?? null,
          createdBy: actor.userId,
        },
        { transaction: t },
      )
      await appendMeasurement(t, actor, p.id, input)
      const view = await toPatientView(p, t)
      await recordAudit(t, actor, { action: 'create', entity: 'patient', entityId: p.id, patientId: p.id, after: view })
      return view
    })
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw duplicateMrn(input.mrn)
    throw err
  }
}

/** Surgeons may open a patient only through an episode on their own list. */
async function assertMaySeePatient(viewer: Viewer, patientId: number): Promise<void> {
  if (!seesOwnPatientsOnly(viewer.role)) return
  const theirs = await Referral.count({ where: { patientId, surgeonId: viewer.userId } })
  if (!theirs) throw new Forbidden('This patient is not on your list', 'not_your_patient')
}

/** The patient's record with measurement history and episodes; the read itself is audited. */
export async function getPatient(viewer: Viewer, id: number): Promise<PatientRecord> {
  const p = await Patient.findByPk(id)
  if (!p) throw new NotFound('Patient')
  await assertMaySeePatient(viewer, id)
  const [view, measurements, referrals] = await Promise.all([
    toPatientView(p),
    PatientMeasurement.findAll({
      where: { patientId: id },
      order: [
        ['measuredAt', 'DESC'],
        ['id', 'DESC'],
      ],
      raw: true,
    }),
    Referral.findAll({
      where: { patientId: id },
      include: [{ model: Procedure, as: 'procedure' }],
      order: [['plannedSurgeryDate', 'DESC']],
    }),
  ])
  await recordAudit(null, viewer, { action: 'view', entity: 'patient', entityId: id, patientId: id, opensRecord: true })
  return {
    ...view,
    measurements: measurements.map((m) => ({
      id: m.id,
      heightCm: m.heightCm,
      weightKg: m.weightKg,
      measuredAt: isoOrNull(m.measuredAt),
      recordedBy: m.recordedBy,
    })),
    referrals: referrals
      .filter((r) => maySeeEpisode(viewer, r))
      .map((r) => {
        const proc = (r as Referral & { procedure?: Procedure }).procedure
        return {
          id: r.id,
          stage: r.stage,
          stageLabel: STAGE_LABELS[r.stage],
          plannedSurgeryDate: r.plannedSurgeryDate,
          procedureName: proc?.name ?? null,
        }
      }),
  }
}

export async function updatePatient(sequelize: Sequelize, viewer: Viewer, id: number, input: UpdatePatientInput): Promise<PatientView> {
  try {
    return await unitOfWork(sequelize, { idempotent: true }, async (t) => {
      const p = await Patient.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
      if (!p) throw new NotFound('Patient')
      if (p.version !== input.version) throw staleVersion('This patient')
      assertMeasuredAfterBirth(input.measuredAt, input.dateOfBirth ?? p.dateOfBirth)
      const before = await toPatientView(p, t)
      const changes: Partial<
        Pick<Patient, 'mrn' | 'givenName' | 'familyName' | 'dateOfBirth' | 'sex' | 'email' | 'phone' | 'gpPractice' | 'notes'>
      > = {}
      for (const k of ['mrn', 'givenName', 'familyName', 'dateOfBirth', 'email', 'phone', 'gpPractice', 'notes'] as const) {
        if (input[k] !== undefined) changes[k] = input[k] as never
      }
      if (input.sex !== undefined) changes.sex = input.sex as Sex
      worklistChanged('patient', t)
      const [count] = await Patient.update(
        { ...changes, version: input.version + 1 },
        { where: { id, version: input.version }, transaction: t },
      )
      if (count !== 1) throw staleVersion('This patient')
      // Only a changed figure is a new measurement; re-sending the same weight is not.
      const height = input.heightCm !== undefined && input.heightCm !== before.heightCm ? input.heightCm : null
      const weight = input.weightKg !== undefined && input.weightKg !== before.weightKg ? input.weightKg : null
      await appendMeasurement(t, viewer, id, { heightCm: height, weightKg: weight, measuredAt: input.measuredAt })
      await p.reload({ transaction: t })
      const after = await toPatientView(p, t)
      await recordAudit(t, viewer, { action: 'update', entity: 'patient', entityId: id, patientId: id, ...changedFields(before, after) })
      return after
    })
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw duplicateMrn(input.mrn ?? '')
    throw err
  }
}

/** Find-as-you-type for the referral form: by MRN or name prefix; surgeons see their own only. */
export async function searchPatients(viewer: Viewer, q: string): Promise<PatientSummary[]> {
  const like = `${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
  const own = seesOwnPatientsOnly(viewer.role)
    ? {
        id: (await Referral.findAll({ where: { surgeonId: viewer.userId }, attributes: ['patientId'], raw: true })).map((r) => r.patientId),
      }
    : {}
  const rows = await Patient.findAll({
    where: { ...own, [Op.or]: [{ mrn: { [Op.like]: like } }, { familyName: { [Op.like]: like } }, { givenName: { [Op.like]: like } }] },
    order: [
      ['familyName', 'ASC'],
      ['givenName', 'ASC'],
    ],
    limit: 20,
  })
  return rows.map((p) => ({
    id: p.id,
    mrn: p.mrn,
    givenName: p.givenName,
    familyName: p.familyName,
    dateOfBirth: p.dateOfBirth,
    sex: p.sex,
  }))
}
