import { Op, type Sequelize, type Transaction } from 'sequelize'
import { Administration, IronProductRow, Prescription, ReadinessReview, Referral, Result, User } from '../../server/models/index'
import { ironDosePlan } from '../../shared/clinical'
import { DEFAULT_CLINIC_SETTINGS } from '../../shared/clinic/settings'
import { currentBody } from '../../server/services/patients'
import { loadReferral } from '../../server/services/episode'
import { projectionForReferral } from '../../server/services/projection'
import { refreshIronResponse } from '../../server/services/ironResponse'
import { clinicTimeZone } from '../../server/services/clinicDay'
import { dateInZone } from '../../shared/pathway'
import { STARTER_FORMULARY, starterFormularyRows } from '../formulary'

const FCM = STARTER_FORMULARY.find((p) => p.code === 'ferric-carboxymaltose')!
const NO_CAUTIONS = { previousHypersensitivity: false, activeInfection: false, firstTrimester: false, severeLiverDisease: false }

export async function loadFormulary(t: Transaction): Promise<void> {
  await IronProductRow.bulkCreate(starterFormularyRows(), { transaction: t })
}

/**
 * Every demo episode that reached treatment gets the prescription and dose behind it:
 * ferric carboxymaltose, the first infusion of its computed plan.
 */
export async function loadDemoTreatments(t: Transaction, doctorId: number, nurseId: number): Promise<void> {
  const treated = await Referral.findAll({ where: { treatmentOrderedAt: { [Op.ne]: null } }, transaction: t })
  for (const r of treated) {
    const body = await currentBody(r.patientId, t)
    const firstHb = await Result.findOne({ where: { referralId: r.id, analyte: 'hb' }, order: [['takenAt', 'ASC']], transaction: t })
    if (!body.weightKg || !firstHb) continue
    // The first dose of the plan the clinic would compute (Ganzoni, capped by the product's rules).
    const plan = ironDosePlan({
      product: FCM,
      weightKg: body.weightKg,
      hbGL: firstHb.valueCanonical,
      targetHbGL: DEFAULT_CLINIC_SETTINGS.ironTargetHbGL,
    })
    const deficit = plan.deficitMg
    const dose = plan.doses[0]?.doseMg ?? 0
    if (!dose) continue
    const orderedAt = r.treatmentOrderedAt!
    const p = await Prescription.create(
      {
        referralId: r.id,
        productCode: 'ferric-carboxymaltose',
        route: 'iv',
        weightKg: body.weightKg,
        hbGL: firstHb.valueCanonical,
        targetHbGL: DEFAULT_CLINIC_SETTINGS.ironTargetHbGL,
        deficitMg: deficit,
        totalMg: dose,
        firstDoseDate: dateInZone(orderedAt, clinicTimeZone()),
        plan: { doses: [{ number: 1, doseMg: dose, dayOffset: 0, cappedBy: [] }], warnings: [], oralSchedule: null },
        cautions: NO_CAUTIONS,
        overrideReason: null,
        status: r.treatmentGivenAt ? 'completed' : 'active',
        prescribedBy: doctorId,
        prescribedAt: orderedAt,
      },
      { transaction: t },
    )
    if (r.treatmentGivenAt) {
      await Administration.create(
        {
          prescriptionId: p.id,
          referralId: r.id,
          doseMg: dose,
          givenAt: r.treatmentGivenAt,
          batchNumber: `DEMO-${4100 + r.id}`,
          reaction: 'none',
          reactionNotes: null,
          givenBy: nurseId,
        },
        { transaction: t },
      )
    }
  }
  // The worklist's response flags follow from these doses and the Hb results after them.
  await refreshIronResponse(
    Referral.sequelize!,
    treated.map((r) => r.id),
    t,
  )
}

/** One surgeon has looked at an anaemic patient close to surgery and asked for the date to move. */
export async function loadDemoDateRequest(sequelize: Sequelize): Promise<void> {
  const r = await Referral.findOne({ where: { stage: 'clinic', anaemic: true }, order: [['plannedSurgeryDate', 'ASC']] })
  if (!r) return
  const surgeon = await User.findByPk(r.surgeonId)
  const viewer = { userId: r.surgeonId, role: 'surgeon' as const, requestId: null, ip: null }
  const loaded = await loadReferral(viewer, r.id)
  const projection = await projectionForReferral(loaded).catch(() => null)
  if (!projection || !surgeon) return
  await sequelize.transaction(async (t) => {
    await ReadinessReview.create(
      {
        referralId: r.id,
        surgeonId: r.surgeonId,
        action: 'date-change-requested',
        reason: 'Still anaemic on the projection; would rather operate after iron has worked (demo).',
        projection,
        at: new Date(),
      },
      { transaction: t },
    )
    await r.update({ dateChangeRequestedAt: new Date() }, { transaction: t })
  })
}
