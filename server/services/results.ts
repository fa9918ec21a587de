import { Op, type Sequelize } from 'sequelize'
import { isReadOnly, toCanonical, type Analyte } from '../../shared/pathway'
import type { CreateResultInput } from '../../shared/schemas/results'
import type { AddedResult, ResultView } from '../../shared/pathway/views'
import { Patient, Referral, Result, User } from '../models/index'
import { recordAudit } from './audit'
import { deriveEgfr, deriveTsat, storeResult } from './resultStore'
import { refreshScreening, screeningView } from './screening'
import { assertMaySeeReferral, clinical, isoOrNull, type Viewer } from './viewer'
import { Conflict, Invalid, NotFound, RuleRefused } from '../errors'
import { unitOfWork } from '../unitOfWork'
import { refreshEpisodeFacts } from './reports/episodeFacts'
import { refreshHbMilestones } from './reports/referralMilestones'

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
    status: r.status ?? 'final',
    comparator: r.comparator ?? null,
    voidedAt: isoOrNull(r.voidedAt ?? null),
    voidReason: r.voidReason ?? null,
    referenceRange: r.referenceRange ?? null,
    abnormalFlags: r.abnormalFlags ?? null,
  }
}

/**
 * Stores one result, derives what follows from it, and re-classifies the episode, all in one
 * transaction with its audit row, through the one result-persistence module (resultStore.ts). The referral row is
 * locked so two results arriving at once
 * cannot leave a stale "latest Hb" behind.
 */
export async function addResult(sequelize: Sequelize, viewer: Viewer, referralId: number, input: CreateResultInput): Promise<AddedResult> {
  const analyte = input.analyte as Analyte
  return unitOfWork(sequelize, { idempotent: true }, async (t) => {
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
    // The natural key (referral, analyte, time taken, value) is unique: the same value of the
    // same sample typed twice is refused, so the clinician knows it is already on the record.
    const existing = await Result.findOne({ where: { referralId, analyte, takenAt, valueCanonical: value }, transaction: t })
    if (existing) {
      throw new Conflict(
        'This result is already recorded for this episode (same test, time taken and value)',
        'duplicate_result',
        { value: 'is already recorded for this sample' },
        { resultId: existing.id },
      )
    }
    const result = await storeResult(
      { ...base, analyte, valueCanonical: value, valueReported: input.value, unitReported: input.unit, source: 'manual' },
      t,
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
    await refreshEpisodeFacts(t, [referral.id])
    await refreshHbMilestones(t, [referral.id]) // the funnel's and waiting times' first and last Hb
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
    return {
      result: view,
      derived: derived.map(toResultView),
      screening,
      referral: { id: referral.id, version: referral.version, stage: referral.stage },
    }
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
    order: [
      ['takenAt', 'DESC'],
      ['id', 'DESC'],
    ],
  })
  await recordAudit(null, viewer, { action: 'view', entity: 'results', entityId: referralId, patientId: referral.patientId })
  return rows.map(toResultView)
}
