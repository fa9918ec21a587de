import { Op, type Sequelize, type Transaction } from 'sequelize'
import { egfrCkdEpi2021, tibcFromTransferrin, tsatFromIron } from '../../shared/clinical'
import { DERIVED_UNITS, ANALYTE_DEFS, ageOn, isReadOnly, toCanonical, type Analyte } from '../../shared/pathway'
import type { CreateResultInput } from '../../shared/schemas/results'
import { Patient, Referral, Result, User } from '../models/index'
import { recordAudit } from './audit'
import { refreshScreening, screeningView } from './screening'
import { assertMaySeeReferral, clinical, isoOrNull, type Viewer } from './viewer'
import { Invalid, NotFound, RuleRefused } from '../errors'

export interface ResultView {
  id: number
  analyte: string
  value: number
  unit: string
  valueReported: number | null
  unitReported: string | null
  takenAt: string
  source: string
  derivedFrom: number[] | null
  enteredBy: { id: number; name: string } | null
  createdAt: string
}

export function toResultView(r: Result & { enteredByUser?: User | null }): ResultView {
  return {
    id: r.id,
    analyte: r.analyte,
    value: r.valueCanonical,
    unit: r.unitCanonical,
    valueReported: r.valueReported,
    unitReported: r.unitReported,
    takenAt: isoOrNull(r.takenAt)!,
    source: r.source,
    derivedFrom: r.derivedFrom,
    enteredBy: r.enteredByUser ? { id: r.enteredByUser.id, name: r.enteredByUser.name } : null,
    createdAt: isoOrNull(r.createdAt)!,
  }
}

const round1 = (n: number) => Math.round(n * 10) / 10

/** The latest result of an analyte taken at exactly this time (one sample = one draw time). */
function sameDraw(referralId: number, analyte: string, takenAt: Date, t: Transaction) {
  return Result.findOne({ where: { referralId, analyte, takenAt }, order: [['id', 'DESC']], transaction: t })
}

/**
 * TSAT from serum iron and transferrin (or TIBC) of the same sample, unless the lab reported
 * a TSAT for that sample itself. Iron above the binding capacity is a unit or typing error.
 */
async function deriveTsat(base: { referralId: number; patientId: number; takenAt: Date; enteredBy: number }, t: Transaction): Promise<Result | null> {
  const { referralId, takenAt } = base
  if (await sameDraw(referralId, 'tsat', takenAt, t)) return null
  const iron = await sameDraw(referralId, 'iron', takenAt, t)
  const tibc = (await sameDraw(referralId, 'tibc', takenAt, t)) ?? (await sameDraw(referralId, 'transferrin', takenAt, t))
  if (!iron || !tibc) return null
  const tsat = clinical('value', () => {
    const tibcUmolL = tibc.analyte === 'tibc' ? tibc.valueCanonical : tibcFromTransferrin(tibc.valueCanonical)
    return tsatFromIron({ ironUmolL: iron.valueCanonical, tibcUmolL })
  })
  return Result.create(
    { ...base, analyte: 'tsat', valueCanonical: round1(tsat), unitCanonical: DERIVED_UNITS.tsat, valueReported: null, unitReported: null, source: 'derived', derivedFrom: [iron.id, tibc.id] },
    { transaction: t },
  )
}

/** eGFR by CKD-EPI 2021 from each creatinine; not for under-18s, whom the equation excludes. */
async function deriveEgfr(creatinine: Result, patient: Patient, t: Transaction): Promise<Result | null> {
  const age = ageOn(patient.dateOfBirth, creatinine.takenAt.toISOString().slice(0, 10))
  if (age < 18) return null
  const egfr = clinical('value', () => egfrCkdEpi2021({ creatinineUmolL: creatinine.valueCanonical, ageYears: age, sex: patient.sex }))
  return Result.create(
    {
      referralId: creatinine.referralId,
      patientId: creatinine.patientId,
      analyte: 'egfr',
      valueCanonical: round1(egfr),
      unitCanonical: DERIVED_UNITS.egfr,
      valueReported: null,
      unitReported: null,
      takenAt: creatinine.takenAt,
      enteredBy: creatinine.enteredBy,
      source: 'derived',
      derivedFrom: [creatinine.id],
    },
    { transaction: t },
  )
}

/**
 * Stores one result, derives what follows from it, and re-classifies the episode, all in one
 * transaction with its audit row. The referral row is locked so two results arriving at once
 * cannot leave a stale "latest Hb" behind.
 */
export async function addResult(sequelize: Sequelize, viewer: Viewer, referralId: number, input: CreateResultInput) {
  const analyte = input.analyte as Analyte
  return sequelize.transaction(async (t) => {
    const referral = await Referral.findByPk(referralId, { transaction: t, lock: t.LOCK.UPDATE })
    if (!referral) throw new NotFound('Referral')
    if (isReadOnly(referral.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
    const patient = (await Patient.findByPk(referral.patientId, { transaction: t }))!
    if (input.takenAt.toISOString().slice(0, 10) < patient.dateOfBirth) {
      throw new Invalid('takenAt must not be before the date of birth', { takenAt: 'must not be before the date of birth' })
    }
    const value = clinical('value', () => toCanonical(analyte, input.unit, input.value))
    // Whole seconds, as stored: results of one sample are matched by their exact draw time.
    const takenAt = new Date(Math.floor(input.takenAt.getTime() / 1000) * 1000)
    const base = { referralId, patientId: patient.id, takenAt, enteredBy: viewer.userId }
    const result = await Result.create(
      { ...base, analyte, valueCanonical: value, unitCanonical: ANALYTE_DEFS[analyte].canonicalUnit, valueReported: input.value, unitReported: input.unit, source: 'manual', derivedFrom: null },
      { transaction: t },
    )
    const derived: Result[] = []
    if (analyte === 'iron' || analyte === 'transferrin' || analyte === 'tibc') {
      const tsat = await deriveTsat(base, t)
      if (tsat) derived.push(tsat)
    }
    if (analyte === 'creatinine') {
      const egfr = await deriveEgfr(result, patient, t)
      if (egfr) derived.push(egfr)
    }
    const before = screeningView(referral, patient.sex)
    await refreshScreening(referral, patient.sex, t)
    await referral.reload({ transaction: t })
    const screening = screeningView(referral, patient.sex)
    const view = toResultView(result)
    await recordAudit(t, viewer, {
      action: 'create',
      entity: 'result',
      entityId: result.id,
      patientId: patient.id,
      before: { screening: before },
      after: { result: view, derived: derived.map(toResultView), screening },
    })
    return { result: view, derived: derived.map(toResultView), screening, referral: { id: referral.id, version: referral.version, stage: referral.stage } }
  })
}

/** Every result on the episode, newest sample first; reading them is audited. */
export async function listResults(viewer: Viewer, referralId: number, analyte?: string): Promise<ResultView[]> {
  const referral = await Referral.findByPk(referralId)
  if (!referral) throw new NotFound('Referral')
  assertMaySeeReferral(viewer, referral.surgeonId)
  const rows = await Result.findAll({
    where: { referralId, ...(analyte ? { analyte: { [Op.eq]: analyte } } : {}) },
    include: [{ model: User, as: 'enteredByUser', attributes: ['id', 'name'] }],
    order: [['takenAt', 'DESC'], ['id', 'DESC']],
  })
  await recordAudit(null, viewer, { action: 'view', entity: 'results', entityId: referralId, patientId: referral.patientId })
  return rows.map(toResultView)
}
