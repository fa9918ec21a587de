import { Op, type Sequelize } from 'sequelize'
import { Patient, Procedure, ReadinessReview, Referral, User } from '../models/index'
import { PRE_OPERATIVE_STAGES, STAGE_LABELS, addDays, daysBetween, referralFlags, FLAG_LABELS } from '../../shared/pathway'
import { READINESS_FLAG_LABELS, VERDICT_LABELS } from '../../shared/clinic/readiness'
import type { ReadinessActionInput } from '../../shared/schemas/clinic'
import type { Projection } from '../../shared/clinic/projection'
import type { ReadinessAnswer, ReadinessReviewView, ReadinessRow } from '../../shared/clinic/views'
import { recordAudit } from './audit'
import { loadReferral, type LoadedReferral } from './episode'
import { projectionForReferral } from './projection'
import { isoOrNull, type Viewer } from './viewer'
import { AppError, Forbidden, Invalid } from '../errors'
import { clinicTimeZone, clinicToday } from './clinicDay'
import { LIMITS, windowTooLong } from '../../shared/limits'
import { worklistChanged } from './worklistCounts'
import { seesOwnPatientsOnly } from '../../shared/permissions'

export interface BoardQuery {
  from?: string
  to?: string
  procedureCode?: string
  surgeonId?: number
}

const BOARD_WEEKS = 8

function reviewView(r: ReadinessReview | null): ReadinessRow['lastReview'] {
  return r ? { action: r.action, reason: r.reason, at: isoOrNull(r.at)! } : null
}

/** The readiness board: episodes with surgery in the window (default the next 8 weeks), each projected. */
export async function readinessBoard(viewer: Viewer, q: BoardQuery): Promise<ReadinessRow[]> {
  const today = clinicToday()
  const from = q.from ?? today
  const to = q.to ?? addDays(from, BOARD_WEEKS * 7)
  if (from > to) throw new Invalid('to must be on or after from', { to: 'must be on or after from' })
  const tooLong = windowTooLong(from, to, LIMITS.readinessDays, 'The readiness window')
  if (tooLong) throw new Invalid(tooLong, { to: `must be within ${LIMITS.readinessDays} days of from` })
  const where: Record<string, unknown> = {
    stage: { [Op.in]: PRE_OPERATIVE_STAGES },
    plannedSurgeryDate: { [Op.between]: [from, to] },
  }
  if (seesOwnPatientsOnly(viewer.role)) {
    if (q.surgeonId && q.surgeonId !== viewer.userId)
      throw new Forbidden("Surgeons see their own patients' readiness only", 'not_your_patient')
    where.surgeonId = viewer.userId
  } else if (q.surgeonId) where.surgeonId = q.surgeonId
  const procedureWhere = q.procedureCode ? { code: q.procedureCode } : undefined
  const rows = (await Referral.findAll({
    where,
    include: [
      { model: Patient, as: 'patient' },
      { model: Procedure, as: 'procedure', where: procedureWhere },
      { model: User, as: 'surgeon', attributes: ['id', 'name'] },
    ],
    order: [
      ['plannedSurgeryDate', 'ASC'],
      ['id', 'ASC'],
    ],
    limit: 500,
  })) as (LoadedReferral & { surgeon: User })[]
  const ids = rows.map((r) => r.id)
  const reviews = ids.length ? await ReadinessReview.findAll({ where: { referralId: { [Op.in]: ids } }, order: [['at', 'DESC']] }) : []
  const latestReview = new Map<number, ReadinessReview>()
  for (const rv of reviews) if (!latestReview.has(rv.referralId)) latestReview.set(rv.referralId, rv)

  return Promise.all(
    rows.map(async (r): Promise<ReadinessRow> => {
      const flags = referralFlags({ ...r.get(), plannedSurgeryDate: r.plannedSurgeryDate }, today, clinicTimeZone())
      const base = {
        id: r.id,
        version: r.version,
        stage: r.stage,
        stageLabel: STAGE_LABELS[r.stage],
        priority: r.priority,
        plannedSurgeryDate: r.plannedSurgeryDate,
        daysToSurgery: daysBetween(today, r.plannedSurgeryDate),
        patient: { id: r.patient.id, mrn: r.patient.mrn, name: `${r.patient.familyName}, ${r.patient.givenName}` },
        procedure: { code: r.procedure.code, name: r.procedure.name },
        surgeon: { id: r.surgeon.id, name: r.surgeon.name },
        openActions: flags.map((f) => FLAG_LABELS[f]),
        lastReview: reviewView(latestReview.get(r.id) ?? null),
      }
      try {
        const p = await projectionForReferral(r)
        return {
          ...base,
          verdict: p.readiness.verdict,
          verdictLabel: VERDICT_LABELS[p.readiness.verdict],
          predictedSurgeryHbGL: p.predictedSurgeryHbGL,
          planningHbGL: p.planningHbGL,
          allowableBloodLossMl: p.allowableBloodLossMl.logarithmic,
          expectedBloodLossMl: p.expectedBloodLossMl,
          bloodOrder: { kind: p.bloodOrder.kind, units: p.bloodOrder.units, decidedBy: p.bloodOrder.decidedBy },
          needs: p.readiness.missing,
          concerns: p.readiness.flags.map((key) => ({ key, label: READINESS_FLAG_LABELS[key] })),
          missing: null,
        }
      } catch (err) {
        if (err instanceof AppError && err.status === 422) {
          return {
            ...base,
            verdict: null,
            verdictLabel: 'Cannot project yet',
            predictedSurgeryHbGL: null,
            planningHbGL: null,
            allowableBloodLossMl: null,
            expectedBloodLossMl: null,
            bloodOrder: null,
            needs: [],
            concerns: [],
            missing: err.message,
          }
        }
        throw err
      }
    }),
  )
}

/**
 * The operating surgeon acknowledges the plan or asks for the date to move. The projection is
 * stored as it was at that moment, so later results never rewrite what the surgeon saw.
 */
export async function recordReadinessAction(
  sequelize: Sequelize,
  viewer: Viewer,
  referralId: number,
  input: ReadinessActionInput,
): Promise<ReadinessAnswer> {
  const r = await loadReferral(viewer, referralId)
  if (r.surgeonId !== viewer.userId) throw new Forbidden('Only the operating surgeon can answer for this episode', 'not_your_patient')
  const projection = await projectionForReferral(r)
  return sequelize.transaction(async (t) => {
    const action = input.action === 'acknowledge' ? ('acknowledged' as const) : ('date-change-requested' as const)
    const review = await ReadinessReview.create(
      { referralId, surgeonId: viewer.userId, action, reason: input.reason ?? null, projection, at: new Date() },
      { transaction: t },
    )
    worklistChanged('referral', t)
    await Referral.update(
      { dateChangeRequestedAt: action === 'date-change-requested' ? new Date() : null },
      { where: { id: referralId }, transaction: t },
    )
    await recordAudit(t, viewer, {
      action,
      entity: 'readiness',
      entityId: review.id,
      patientId: r.patientId,
      after: { verdict: projection.readiness.verdict, reason: input.reason ?? null, predictedSurgeryHbGL: projection.predictedSurgeryHbGL },
    })
    return { id: review.id, action, reason: review.reason, at: isoOrNull(review.at)!, projection }
  })
}

export async function listReadinessReviews(viewer: Viewer, referralId: number): Promise<ReadinessReviewView[]> {
  const r = await loadReferral(viewer, referralId)
  await recordAudit(null, viewer, { action: 'view', entity: 'readiness-reviews', entityId: referralId, patientId: r.patientId })
  const rows = await ReadinessReview.findAll({ where: { referralId }, order: [['at', 'DESC']] })
  // The column holds the Projection recordReadinessAction stored, exactly as the surgeon saw it.
  return rows.map((r) => ({
    id: r.id,
    action: r.action,
    reason: r.reason,
    at: isoOrNull(r.at)!,
    surgeonId: r.surgeonId,
    projection: r.projection as Projection,
  }))
}
