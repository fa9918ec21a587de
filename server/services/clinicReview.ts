import type { Sequelize } from 'sequelize'
import { ClinicReview, Referral, User } from '../models/index'
import { DIAGNOSIS_LABELS } from '../../shared/clinic/diagnoses'
import type { ReviewInput } from '../../shared/schemas/clinic'
import type { ClinicReviewView, RecordedReview } from '../../shared/clinic/views'
import { isReadOnly } from '../../shared/pathway'
import { recordAudit } from './audit'
import { loadReferral } from './episode'
import { isoOrNull, staleVersion, type Viewer } from './viewer'
import { RuleRefused } from '../errors'
import { worklistChanged } from './worklistCounts'

export function toReviewView(r: ClinicReview & { reviewer?: User | null }): ClinicReviewView {
  return {
    id: r.id,
    diagnosis: r.diagnosis,
    diagnosisLabel: DIAGNOSIS_LABELS[r.diagnosis],
    notes: r.notes,
    plan: r.plan,
    reviewedAt: isoOrNull(r.reviewedAt)!,
    reviewer: r.reviewer ? { id: r.reviewer.id, name: r.reviewer.name } : null,
  }
}

/** A clinic doctor's review: working diagnosis, plan, and whether heart disease sets the 80 g/L trigger. */
export async function recordReview(sequelize: Sequelize, viewer: Viewer, referralId: number, input: ReviewInput): Promise<RecordedReview> {
  return sequelize.transaction(async (t) => {
    const r = await loadReferral(viewer, referralId, t, true)
    if (r.version !== input.version) throw staleVersion('This referral')
    if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
    const review = await ClinicReview.create(
      {
        referralId,
        diagnosis: input.diagnosis as ReviewInput['diagnosis'] & ClinicReview['diagnosis'],
        notes: input.notes ?? null,
        plan: input.plan,
        reviewedBy: viewer.userId,
        reviewedAt: new Date(),
      },
      { transaction: t },
    )
    worklistChanged('referral', t)
    const [count] = await Referral.update(
      { cardiovascularDisease: input.cardiovascularDisease ?? false, version: r.version + 1 },
      { where: { id: referralId, version: r.version }, transaction: t },
    )
    if (count !== 1) throw staleVersion('This referral')
    const view = toReviewView(review)
    await recordAudit(t, viewer, {
      action: 'create',
      entity: 'clinic-review',
      entityId: review.id,
      patientId: r.patientId,
      before: { cardiovascularDisease: r.cardiovascularDisease },
      after: { ...view, cardiovascularDisease: input.cardiovascularDisease },
    })
    return { review: view, version: r.version + 1 }
  })
}

export async function listReviews(viewer: Viewer, referralId: number): Promise<ClinicReviewView[]> {
  const r = await loadReferral(viewer, referralId)
  await recordAudit(null, viewer, { action: 'view', entity: 'clinic-reviews', entityId: referralId, patientId: r.patientId })
  const rows = await ClinicReview.findAll({
    where: { referralId },
    include: [{ model: User, as: 'reviewer', attributes: ['id', 'name'] }],
    order: [['reviewedAt', 'DESC']],
  })
  return rows.map(toReviewView)
}
