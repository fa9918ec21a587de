import type { Sequelize } from 'sequelize'
import { Administration, Prescription, Referral, User } from '../models/index'
import { ageOn, dateInZone, findMove, isReadOnly } from '../../shared/pathway'
import { recheckDueOn } from '../../shared/clinic/recheck'
import { clinicTimeZone } from './clinicDay'
import { ADULT_AGE_YEARS } from '../../shared/clinical'
import { checkGivenDose } from '../../shared/clinic/doseCheck'
import type { AdministrationInput } from '../../shared/schemas/clinic'
import type { Reaction } from '../models/administration'
import type { AdministrationView, RecordedAdministration } from '../../shared/clinic/views'
import { recordAudit } from './audit'
import { getClinicSettings } from './clinicSettings'
import { loadReferral } from './episode'
import { findProduct, toIronProduct } from './formulary'
import { recordMove } from './transitions'
import { currentBody } from './patients'
import { refreshIronResponse } from './ironResponse'
import { isoOrNull, type Viewer } from './viewer'
import { NotFound, RuleRefused } from '../errors'
import { worklistChanged } from './worklistCounts'
import { refreshEpisodeFacts } from './reports/episodeFacts'
import { refreshMilestones } from './reports/referralMilestones'

export function toAdministrationView(a: Administration & { giver?: User | null }): AdministrationView {
  return {
    id: a.id,
    prescriptionId: a.prescriptionId,
    doseMg: a.doseMg,
    givenAt: isoOrNull(a.givenAt)!,
    batchNumber: a.batchNumber,
    reaction: a.reaction,
    reactionNotes: a.reactionNotes,
    overrideReason: a.overrideReason ?? null,
    giver: a.giver ? { id: a.giver.id, name: a.giver.name } : null,
  }
}

/**
 * Records a dose given. The dose is re-checked against the product's single-dose, mg/kg,
 * interval, weekly and course caps and the prescribed total; an overshoot is refused (422
 * naming each cap) unless a reason is recorded with it; the episode moves to treating where the
 * pathway table allows this role that move, and the re-check is scheduled
 * the clinic's configured number of days after this (the latest) dose.
 */
export async function recordAdministration(
  sequelize: Sequelize,
  viewer: Viewer,
  referralId: number,
  input: AdministrationInput,
): Promise<RecordedAdministration> {
  const settings = await getClinicSettings()
  return sequelize.transaction(async (t) => {
    const r = await loadReferral(viewer, referralId, t, true)
    if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
    const p = await Prescription.findOne({ where: { id: input.prescriptionId, referralId }, transaction: t })
    if (!p) throw new NotFound('Prescription on this episode')
    if (p.status !== 'active')
      throw new RuleRefused(`This prescription is ${p.status}; record doses against the active one`, 'prescription_not_active')
    const product = toIronProduct(await findProduct(p.productCode))
    const givenAt = new Date(input.givenAt)
    const body = await currentBody(r.patientId, t)
    const weight = body.weightKg ?? p.weightKg
    const earlier = await Administration.findAll({
      where: { referralId },
      attributes: ['doseMg', 'givenAt', 'prescriptionId'],
      transaction: t,
    })
    const violations = checkGivenDose({
      product,
      weightKg: weight,
      paediatric: ageOn(r.patient.dateOfBirth, dateInZone(givenAt, clinicTimeZone())) < ADULT_AGE_YEARS,
      doseMg: input.doseMg,
      givenAt,
      earlier: earlier.map((d) => ({ doseMg: d.doseMg, givenAt: d.givenAt })),
      givenOnPrescriptionMg: earlier.filter((d) => d.prescriptionId === p.id).reduce((sum, d) => sum + d.doseMg, 0),
      prescribedTotalMg: p.totalMg,
    })
    if (violations.length && !input.overrideReason) {
      const fields = Object.fromEntries(violations.map((v) => [v.cap, v.message]))
      const code = violations.some((v) => v.cap === 'minIntervalDays') && violations.length === 1 ? 'interval_too_short' : 'dose_over_cap'
      throw new RuleRefused(`${violations.map((v) => v.message).join('; ')}. Record a reason to give it anyway.`, code, {
        ...fields,
        overrideReason: 'is required to give a dose over a cap',
      })
    }
    const a = await Administration.create(
      {
        prescriptionId: p.id,
        referralId,
        doseMg: input.doseMg,
        givenAt,
        batchNumber: input.batchNumber,
        reaction: input.reaction as Reaction,
        reactionNotes: input.reactionNotes ?? null,
        givenBy: viewer.userId,
        overrideReason: violations.length ? (input.overrideReason ?? null) : null,
      },
      { transaction: t },
    )
    const given = ((await Administration.sum('doseMg', { where: { prescriptionId: p.id }, transaction: t })) as number | null) ?? 0
    if (given >= p.totalMg) await p.update({ status: 'completed' }, { transaction: t })

    let version = r.version
    // A dose moves the episode to treating only where the pathway table itself offers this role
    // that move (today: a doctor, from clinic or recheck). Otherwise the dose is recorded, since it
    // was given, and the stage stays for someone allowed to move it.
    const moves = findMove(r.stage, 'treating')?.roles.includes(viewer.role) ?? false
    if (moves) {
      version = await recordMove(t, viewer, r, 'treating', `Iron given: ${input.doseMg} mg ${product.name} (batch ${input.batchNumber})`)
    }
    const recheckDueDate = recheckDueOn(givenAt, clinicTimeZone(), settings.recheckDaysAfterLastDose)
    worklistChanged('referral', t)
    await Referral.update({ treatmentGivenAt: givenAt, recheckDueDate }, { where: { id: referralId }, transaction: t })
    await refreshIronResponse(sequelize, [referralId], t)
    await refreshEpisodeFacts(t, [referralId]) // iron before surgery
    await refreshMilestones(t, [referralId]) // the first dose (and the move to treating, refreshed by recordMove too)
    const view = toAdministrationView(a)
    await recordAudit(t, viewer, {
      action: 'create',
      entity: 'administration',
      entityId: a.id,
      patientId: r.patientId,
      after: { ...view, recheckDueDate },
    })
    return { administration: view, recheckDueDate, stage: moves ? 'treating' : r.stage, version }
  })
}

export async function listAdministrations(viewer: Viewer, referralId: number): Promise<AdministrationView[]> {
  const r = await loadReferral(viewer, referralId)
  await recordAudit(null, viewer, { action: 'view', entity: 'administrations', entityId: referralId, patientId: r.patientId })
  const rows = await Administration.findAll({
    where: { referralId },
    include: [{ model: User, as: 'giver', attributes: ['id', 'name'] }],
    order: [['givenAt', 'DESC']],
  })
  return rows.map(toAdministrationView)
}
