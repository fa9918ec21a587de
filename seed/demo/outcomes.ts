import type { Transaction } from 'sequelize'
import { Outcome, Patient, Referral, StageTransition, User } from '../../server/models/index'
import { addDays } from '../../shared/pathway'
import type { Complication } from '../../shared/schemas/outcomes'

/**
 * Invented post-operative records for the demo episodes that have had surgery (by family name).
 * Closed episodes carry their follow-up too, because the server closes an episode after surgery
 * only once the follow-up is on record. One operated patient (Stonecrop) has the record but not
 * yet the follow-up; the other two operated patients have neither, so the demo shows each step.
 */
interface DemoOutcome {
  lossMl: number; intra: number; post: number; crossmatched: number; lowestHbGL: number; dischargeHbGL: number | null
  stayDays: number; complications: Complication[]
  followUp?: { afterDays: number; hbGL: number; iron: boolean; notes: string }
}

export const DEMO_OUTCOMES: Record<string, DemoOutcome> = {
  Stonecrop: { lossMl: 650, intra: 0, post: 1, crossmatched: 2, lowestHbGL: 94, dischargeHbGL: 101, stayDays: 6, complications: ['none'] },
  Dewberry: {
    lossMl: 900, intra: 0, post: 0, crossmatched: 0, lowestHbGL: 108, dischargeHbGL: 112, stayDays: 3, complications: ['none'],
    followUp: { afterDays: 5, hbGL: 124, iron: false, notes: 'Recovering well (demo).' },
  },
  Sloeberry: {
    lossMl: 350, intra: 0, post: 0, crossmatched: 2, lowestHbGL: 112, dischargeHbGL: 115, stayDays: 5, complications: ['infection'],
    followUp: { afterDays: 6, hbGL: 109, iron: true, notes: 'Wound infection treated; oral iron for three months (demo).' },
  },
  Mosswell: {
    lossMl: 1400, intra: 1, post: 1, crossmatched: 4, lowestHbGL: 83, dischargeHbGL: 95, stayDays: 9, complications: ['none'],
    followUp: { afterDays: 6, hbGL: 118, iron: true, notes: 'IV iron given on the ward before discharge (demo).' },
  },
}

/** Dates follow each episode's own "Surgery done" move (the demo closes a week after surgery, so the re-check comes first). */
export async function loadDemoOutcomes(t: Transaction): Promise<void> {
  const nurse = await User.findOne({ where: { email: 'nurse@ferrolane.test' }, transaction: t })
  for (const [family, o] of Object.entries(DEMO_OUTCOMES)) {
    const patient = await Patient.findOne({ where: { familyName: family }, transaction: t })
    const referral = patient && (await Referral.findOne({ where: { patientId: patient.id }, transaction: t }))
    const operated = referral && (await StageTransition.findOne({ where: { referralId: referral.id, toStage: 'operated' }, transaction: t }))
    if (!referral || !operated) throw new Error(`Demo data: ${family} has no operated episode`)
    const surgeryDate = operated.at.toISOString().slice(0, 10)
    const f = o.followUp
    await Outcome.create({
      referralId: referral.id, surgeryDate, bloodLossMl: o.lossMl, unitsTransfusedIntraOp: o.intra, unitsTransfusedPostOp: o.post,
      unitsCrossmatched: o.crossmatched, lowestHbGL: o.lowestHbGL, dischargeHbGL: o.dischargeHbGL, lengthOfStayDays: o.stayDays,
      complications: o.complications, recordedBy: nurse?.id ?? null,
      ...(f ? {
        followUpRecheckHbGL: f.hbGL, followUpRecheckDate: addDays(surgeryDate, f.afterDays), followUpIronAfterSurgery: f.iron,
        followUpNotes: f.notes, followUpBy: nurse?.id ?? null, followUpAt: new Date(`${addDays(surgeryDate, f.afterDays)}T12:00:00Z`),
      } : {}),
      createdAt: operated.at, updatedAt: operated.at,
    }, { transaction: t })
  }
}
