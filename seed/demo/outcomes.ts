import type { Transaction } from 'sequelize'
import { Outcome, Patient, Procedure, Referral, StageTransition, SurgeryDateChange, Transfusion, User } from '../../server/models/index'
import { transfusionThreshold } from '../../shared/transfusion/rules'
import { addDays } from '../../shared/pathway'
import type { Complication } from '../../shared/schemas/outcomes'
import { clinicTimeZone } from '../../server/services/clinicDay'
import { dateInZone } from '../../shared/pathway/dates'

/**
 * Invented post-operative records for the demo episodes that have had surgery (by family name).
 * Closed episodes carry their follow-up too, because the server closes an episode after surgery
 * only once the follow-up is on record. One operated patient (Stonecrop) has the record but not
 * yet the follow-up; the other two operated patients have neither, so the demo shows each step.
 */
interface DemoOutcome {
  lossMl: number
  intra: number
  post: number
  crossmatched: number
  lowestHbGL: number
  dischargeHbGL: number | null
  stayDays: number
  complications: Complication[]
  followUp?: { afterDays: number; hbGL: number; iron: boolean; notes: string }
  /** Blood-saving answers on the operative record (invented). */
  txaMg?: number
  salvageMl?: number
  informed?: boolean
  postOpIron?: boolean
  /** Why the surgery date moved once before surgery (invented), and by how many days. */
  moved?: { reason: 'anaemia' | 'theatre-capacity' | 'patient-choice'; days: number }
}

export const DEMO_OUTCOMES: Record<string, DemoOutcome> = {
  Stonecrop: {
    lossMl: 650,
    intra: 0,
    post: 1,
    crossmatched: 2,
    lowestHbGL: 94,
    dischargeHbGL: 101,
    stayDays: 6,
    complications: ['none'],
    txaMg: 1000,
    informed: true,
    moved: { reason: 'anaemia', days: 21 },
  },
  Dewberry: {
    lossMl: 900,
    intra: 0,
    post: 0,
    crossmatched: 0,
    lowestHbGL: 108,
    dischargeHbGL: 112,
    stayDays: 3,
    complications: ['none'],
    txaMg: 1000,
    informed: true,
    moved: { reason: 'theatre-capacity', days: 7 },
    followUp: { afterDays: 5, hbGL: 124, iron: false, notes: 'Recovering well (demo).' },
  },
  Sloeberry: {
    lossMl: 350,
    intra: 0,
    post: 0,
    crossmatched: 2,
    lowestHbGL: 112,
    dischargeHbGL: 115,
    stayDays: 5,
    complications: ['infection'],
    postOpIron: true,
    followUp: { afterDays: 6, hbGL: 109, iron: true, notes: 'Wound infection treated; oral iron for three months (demo).' },
  },
  Mosswell: {
    lossMl: 1400,
    intra: 1,
    post: 1,
    crossmatched: 4,
    lowestHbGL: 83,
    dischargeHbGL: 95,
    stayDays: 9,
    complications: ['none'],
    salvageMl: 350,
    informed: false,
    postOpIron: true,
    moved: { reason: 'anaemia', days: 28 },
    followUp: { afterDays: 6, hbGL: 118, iron: true, notes: 'IV iron given on the ward before discharge (demo).' },
  },
}

/** Dates follow each episode's own "Surgery done" move (the demo closes a week after surgery, so the re-check comes first). */
export async function loadDemoOutcomes(t: Transaction): Promise<void> {
  const nurse = await User.findOne({ where: { email: 'nurse@ferrolane.test' }, transaction: t })
  for (const [family, o] of Object.entries(DEMO_OUTCOMES)) {
    const patient = await Patient.findOne({ where: { familyName: family }, transaction: t })
    const referral = patient && (await Referral.findOne({ where: { patientId: patient.id }, transaction: t }))
    const operated =
      referral && (await StageTransition.findOne({ where: { referralId: referral.id, toStage: 'operated' }, transaction: t }))
    if (!referral || !operated) throw new Error(`Demo data: ${family} has no operated episode`)
    const surgeryDate = dateInZone(operated.at, clinicTimeZone())
    const f = o.followUp
    await Outcome.create(
      {
        referralId: referral.id,
        surgeryDate,
        bloodLossMl: o.lossMl,
        unitsTransfusedIntraOp: o.intra,
        unitsTransfusedPostOp: o.post,
        unitsCrossmatched: o.crossmatched,
        lowestHbGL: o.lowestHbGL,
        dischargeHbGL: o.dischargeHbGL,
        lengthOfStayDays: o.stayDays,
        complications: o.complications,
        recordedBy: nurse?.id ?? null,
        ...(f
          ? {
              followUpRecheckHbGL: f.hbGL,
              followUpRecheckDate: addDays(surgeryDate, f.afterDays),
              followUpIronAfterSurgery: f.iron,
              followUpNotes: f.notes,
              followUpBy: nurse?.id ?? null,
              followUpAt: new Date(`${addDays(surgeryDate, f.afterDays)}T12:00:00Z`),
            }
          : {}),
        tranexamicAcidGiven: o.txaMg != null ? true : o.lossMl >= 500 ? false : null,
        tranexamicAcidDoseMg: o.txaMg ?? null,
        tranexamicAcidTiming: o.txaMg ? 'before-incision' : null,
        cellSalvageUsed: o.salvageMl != null,
        cellSalvageReturnedMl: o.salvageMl ?? null,
        transfusionInformationGiven: o.informed ?? null,
        transfusionConsent: o.informed ?? null,
        postOperativeIronGiven: o.postOpIron ?? null,
        createdAt: operated.at,
        updatedAt: operated.at,
      },
      { transaction: t },
    )
    // The unit counts above are what the transfusion record adds up to: one row per red-cell unit,
    // the ward units each followed by a re-check (invented figures, below the AABB 2023 threshold).
    const procedure = await Procedure.findByPk(referral.procedureId, { transaction: t })
    const threshold = transfusionThreshold({
      specialty: procedure?.specialty ?? '',
      cardiovascularDisease: Boolean(referral.cardiovascularDisease),
    })
    const unit = (phase: 'during-surgery' | 'after-surgery', hours: number, preHbGL: number, postHbGL: number | null) =>
      Transfusion.create(
        {
          referralId: referral.id,
          givenAt: new Date(operated.at.getTime() + hours * 3_600_000),
          phase,
          component: 'red-cells',
          units: 1,
          preTransfusionHbGL: preHbGL,
          postTransfusionHbGL: postHbGL,
          reassessedBeforeNext: postHbGL != null,
          informationGiven: o.informed ?? false,
          productCodes: ['E0336V00'],
          reason: null,
          thresholdGL: threshold.thresholdGL,
          thresholdBasis: threshold.basis,
          recordedBy: nurse?.id ?? null,
        },
        { transaction: t },
      )
    for (let i = 0; i < o.intra; i++) await unit('during-surgery', 1 + i, threshold.thresholdGL - 6, null)
    for (let i = 0; i < o.post; i++) await unit('after-surgery', 20 + 12 * i, threshold.thresholdGL - 4 - i, threshold.thresholdGL + 6)
    if (o.moved) {
      await SurgeryDateChange.create(
        {
          referralId: referral.id,
          fromDate: addDays(surgeryDate, -o.moved.days),
          toDate: surgeryDate,
          reason: o.moved.reason,
          note: o.moved.reason === 'anaemia' ? 'Iron first, then surgery (demo).' : null,
          changedBy: nurse?.id ?? null,
          changedAt: new Date(operated.at.getTime() - (o.moved.days + 7) * 86_400_000),
        },
        { transaction: t },
      )
    }
  }
  // Every demo referral was listed for surgery (the decision to operate) a week before it was referred.
  await Referral.sequelize!.query(
    'UPDATE referrals SET listing_date = DATE_SUB(DATE(created_at), INTERVAL 7 DAY) WHERE listing_date IS NULL',
    { transaction: t },
  )
}
