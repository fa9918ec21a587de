import type { Sequelize } from 'sequelize'
import { Op } from 'sequelize'
import { Administration, Prescription, Referral, Result, User } from '../models/index'
import { FINAL_WHERE } from '../models/result'
import { ironDosePlan, IronPlanRefusal, type IronDosePlan, type IronProduct } from '../../shared/clinical'
import { checkDosesAgainstCaps } from '../../shared/clinic/doseCheck'
import { IV_IRON_CAUTIONS, positiveCautions, type CautionAnswers } from '../../shared/clinic/cautions'
import { DECISION_SUPPORT_CAUTION } from '../../shared/clinic/readiness'
import type { DosePlanPreviewInput, PrescriptionInput } from '../../shared/schemas/clinic'
import type { DosePlanPreview, PrescriptionView, RecordedPrescription } from '../../shared/clinic/views'
import { ageOn, daysBetween, isReadOnly } from '../../shared/pathway'
import { clinicToday } from './clinicDay'
import { recordAudit } from './audit'
import { getClinicSettings } from './clinicSettings'
import { clinicalFacts, loadReferral, type LoadedReferral } from './episode'
import { findProduct, toIronProduct, FORMULARY_CAUTION } from './formulary'
import { clinical, isoOrNull, staleVersion, type Viewer } from './viewer'
import { Invalid, RuleRefused } from '../errors'
import { worklistChanged } from './worklistCounts'
import { refreshEpisodeFacts } from './reports/episodeFacts'
import { refreshMilestones } from './reports/referralMilestones'

export const PHOSPHATE_SOURCE =
  'Ferinject SmPC 4.4; MHRA Drug Safety Update 2020: check serum phosphate before repeated high doses (hypophosphataemia, osteomalacia)'

/**
 * A repeat course of a product marked phosphateCheckOnRepeat (ferric carboxymaltose) needs a
 * serum phosphate taken after the last dose of that product given to this patient.
 */
async function phosphateNeeded(r: LoadedReferral, product: IronProduct): Promise<{ needed: boolean; message: string }> {
  if (!product.phosphateCheckOnRepeat) return { needed: false, message: '' }
  const referralIds = (await Referral.findAll({ where: { patientId: r.patientId }, attributes: ['id'], raw: true })).map((x) => x.id)
  const courseIds = (
    await Prescription.findAll({ where: { referralId: referralIds, productCode: product.code }, attributes: ['id'], raw: true })
  ).map((x) => x.id)
  const last = courseIds.length
    ? await Administration.findOne({ where: { prescriptionId: courseIds }, order: [['givenAt', 'DESC']] })
    : null
  if (!last) return { needed: false, message: '' }
  const phosphate = await Result.findOne({
    where: { referralId: r.id, analyte: 'phosphate', takenAt: { [Op.gt]: last.givenAt }, ...FINAL_WHERE },
  })
  if (phosphate) return { needed: false, message: '' }
  return {
    needed: true,
    message:
      `A repeat course of ${product.name}: record a serum phosphate taken since the last dose ` +
      `(${last.givenAt.toISOString().slice(0, 10)}) first (${PHOSPHATE_SOURCE}).`,
  }
}

/** The figures a dose is computed from; a missing one is a 422 that names it, never a default. */
async function doseInputs(r: LoadedReferral, input: DosePlanPreviewInput): Promise<DosePlanPreview> {
  const [facts, settings, productRow] = await Promise.all([clinicalFacts(r), getClinicSettings(), findProduct(input.productCode)])
  if (facts.body.weightKg == null)
    throw new RuleRefused("Record the patient's weight before prescribing iron", 'weight_missing', { weightKg: 'is missing' })
  const latestHb = facts.hb[facts.hb.length - 1]
  if (!latestHb) throw new RuleRefused('Record an Hb result before prescribing iron', 'hb_missing', { hb: 'is missing' })
  const product = toIronProduct(productRow)
  const targetHbGL = input.targetHbGL ?? settings.ironTargetHbGL
  const firstDoseDate = input.firstDoseDate ?? clinicToday()
  const ageYears = ageOn(r.patient.dateOfBirth, clinicToday())
  const plan: IronDosePlan = clinical('productCode', () => {
    try {
      return ironDosePlan({
        product,
        weightKg: facts.body.weightKg!,
        hbGL: latestHb.hbGL,
        targetHbGL,
        startDate: firstDoseDate,
        heightCm: facts.body.heightCm,
        sex: r.patient.sex,
        ageYears,
        surgeryDate: r.plannedSurgeryDate,
      })
    } catch (err) {
      if (err instanceof IronPlanRefusal) throw new RuleRefused(err.message, err.code, { [err.input]: err.message })
      throw err
    }
  })
  const warnings = [...plan.warnings]
  const phosphate = await phosphateNeeded(r, product)
  if (phosphate.needed) warnings.unshift(phosphate.message)
  const weightAgeDays = facts.body.weightMeasuredAt ? daysBetween(facts.body.weightMeasuredAt.slice(0, 10), clinicToday()) : null
  if (weightAgeDays !== null && weightAgeDays > settings.weightMaxAgeDays) {
    warnings.unshift(
      `The weight (${facts.body.weightKg} kg) was measured ${weightAgeDays} days ago, more than ${settings.weightMaxAgeDays}: ` +
        `re-weigh the patient before relying on this dose.`,
    )
  }
  return {
    product,
    productSource: productRow.source,
    inputs: {
      weightKg: facts.body.weightKg,
      weightMeasuredAt: facts.body.weightMeasuredAt,
      heightCm: facts.body.heightCm,
      ageYears,
      hbGL: latestHb.hbGL,
      hbTakenAt: isoOrNull(latestHb.takenAt),
      targetHbGL: plan.method.targetHbGL,
      firstDoseDate,
      plannedSurgeryDate: r.plannedSurgeryDate,
    },
    plan: { ...plan, warnings },
    phosphate,
    methods: {
      deficit: plan.method.methodName,
      caps: `Caps from the formulary entry for ${product.name}${plan.paediatric ? ' (paediatric caps applied)' : ''}. ${FORMULARY_CAUTION}`,
    },
    cautions: [DECISION_SUPPORT_CAUTION, FORMULARY_CAUTION],
    cautionQuestions: product.route === 'iv' ? IV_IRON_CAUTIONS : [],
  }
}

export async function previewDosePlan(viewer: Viewer, referralId: number, input: DosePlanPreviewInput): Promise<DosePlanPreview> {
  return doseInputs(await loadReferral(viewer, referralId), input)
}

export function toPrescriptionView(p: Prescription & { prescriber?: User | null }): PrescriptionView {
  return {
    id: p.id,
    productCode: p.productCode,
    route: p.route,
    weightKg: p.weightKg,
    hbGL: p.hbGL,
    targetHbGL: p.targetHbGL,
    deficitMg: p.deficitMg,
    totalMg: p.totalMg,
    firstDoseDate: p.firstDoseDate,
    doses: p.plan.doses,
    warnings: p.plan.warnings,
    oralSchedule: p.plan.oralSchedule ?? null,
    cautions: p.cautions,
    overrideReason: p.overrideReason,
    status: p.status,
    prescribedAt: isoOrNull(p.prescribedAt)!,
    prescriber: p.prescriber ? { id: p.prescriber.id, name: p.prescriber.name } : null,
  }
}

/** Saves a prescription after re-computing it and re-checking every dose against the caps. */
export async function prescribe(
  sequelize: Sequelize,
  viewer: Viewer,
  referralId: number,
  input: PrescriptionInput,
): Promise<RecordedPrescription> {
  const r = await loadReferral(viewer, referralId)
  if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
  const computed = await doseInputs(r, input)
  const { product, plan } = computed
  const doses = input.doses?.length
    ? input.doses.map((d, i) => ({ number: i + 1, doseMg: d.doseMg, dayOffset: d.dayOffset, cappedBy: [] }))
    : plan.doses
  if (computed.phosphate.needed)
    throw new RuleRefused(computed.phosphate.message, 'phosphate_required', {
      phosphate: 'a serum phosphate result is needed before a repeat course',
    })
  if (product.route === 'iv') {
    const surgeryDayOffset = daysBetween(computed.inputs.firstDoseDate, r.plannedSurgeryDate)
    const violations = checkDosesAgainstCaps(product, computed.inputs.weightKg, doses, plan.totalMg, {
      paediatric: plan.paediatric,
      surgeryDayOffset,
      needLabel: plan.method.method === 'product-table' ? 'product dosing table' : 'Ganzoni',
    })
    if (violations.length) {
      throw new RuleRefused(
        violations.map((v) => v.message).join('; '),
        'dose_over_cap',
        Object.fromEntries(violations.map((v) => [v.cap, v.message])),
      )
    }
    if (!input.cautions) {
      throw new Invalid('Answer every caution question before prescribing IV iron', { cautions: 'Answer every caution question' })
    }
    const positives = positiveCautions(input.cautions as CautionAnswers)
    if (positives.length && !input.overrideReason) {
      const asked = IV_IRON_CAUTIONS.filter((c) => positives.includes(c.key)).map((c) => c.question.replace(/\?$/, ''))
      throw new RuleRefused(
        `IV iron is blocked by: ${asked.join('; ')}. Record an override reason to prescribe anyway.`,
        'caution_positive',
        { overrideReason: 'is required when a caution is answered yes' },
      )
    }
  }
  return sequelize.transaction(async (t) => {
    const locked = await loadReferral(viewer, referralId, t, true)
    if (locked.version !== input.version) throw staleVersion('This referral')
    // One active prescription per episode: a new one replaces the old.
    await Prescription.update({ status: 'cancelled' }, { where: { referralId, status: 'active' }, transaction: t })
    const p = await Prescription.create(
      {
        referralId,
        productCode: product.code,
        route: product.route,
        weightKg: computed.inputs.weightKg,
        hbGL: computed.inputs.hbGL,
        targetHbGL: computed.inputs.targetHbGL,
        deficitMg: plan.deficitMg,
        totalMg: doses.reduce((s, d) => s + d.doseMg, 0) || plan.totalMg,
        firstDoseDate: computed.inputs.firstDoseDate,
        plan: { doses, warnings: plan.warnings, oralSchedule: plan.oralSchedule?.description ?? null },
        cautions: (input.cautions ?? null) as CautionAnswers | null,
        overrideReason: input.overrideReason ?? null,
        status: 'active',
        prescribedBy: viewer.userId,
        prescribedAt: new Date(),
      },
      { transaction: t },
    )
    worklistChanged('referral', t)
    const [count] = await Referral.update(
      { treatmentOrderedAt: new Date(), treatmentGivenAt: null, version: locked.version + 1 },
      { where: { id: referralId, version: locked.version }, transaction: t },
    )
    if (count !== 1) throw staleVersion('This referral')
    await refreshEpisodeFacts(t, [referralId]) // a prescription marks the episode iron deficient
    await refreshMilestones(t, [referralId])
    const view = toPrescriptionView(p)
    await recordAudit(t, viewer, { action: 'create', entity: 'prescription', entityId: p.id, patientId: locked.patientId, after: view })
    return { prescription: view, version: locked.version + 1 }
  })
}

export async function listPrescriptions(viewer: Viewer, referralId: number): Promise<PrescriptionView[]> {
  const r = await loadReferral(viewer, referralId)
  await recordAudit(null, viewer, { action: 'view', entity: 'prescriptions', entityId: referralId, patientId: r.patientId })
  const rows = await Prescription.findAll({
    where: { referralId },
    include: [{ model: User, as: 'prescriber', attributes: ['id', 'name'] }],
    order: [['prescribedAt', 'DESC']],
  })
  return rows.map(toPrescriptionView)
}
