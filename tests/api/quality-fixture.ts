import { Administration, Outcome, Prescription, Result, SurgeryDateChange, Transfusion } from '../../server/models/index'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { factsAfterHandWrites } from '../helpers/episodeFacts'

/**
 * Four operated episodes in 2025 and one in 2024, small enough that every quality measure can
 * be counted by hand (see the quality test). Clinic criteria: the default 'surgical' (Hb < 130
 * g/L for both sexes). ORTHO expects 1000 mL blood loss, LAP 150 mL.
 *
 *   Q1 S1 ORTHO F  Hb 100 (02-01) absolute deficiency, iron 02-05, Hb 118 (03-08)  surgery 03-10  TXA yes, post-op iron yes
 *                  red cells 1 unit (pre 75, reassessed, post 82, informed), then 1 unit (pre 78, reassessed, post 86)
 *   Q2 S1 ORTHO M  Hb 125 (03-20) iron-restricted, no iron                           surgery 04-01  TXA no; postponed for anaemia
 *                  red cells 2 units at once (pre 70, not reassessed, no post Hb, not informed)
 * Q3 S2 LAP   F  Hb 140 (04-01) replete                                           surgery 05-20  platelets 1 (not informed), record:
 * informed
 *                  date moved once for theatre capacity
 *   Q4 S2 ORTHO F  no Hb                                                            surgery 06-10  nothing recorded
 *   Q5 S1 ORTHO F  surgery 2024-12-15 (outside the period), 3 red-cell units
 */
export interface QualityFixture {
  s1: StaffFixture
  s2: StaffFixture
  ids: Record<'q1' | 'q2' | 'q3' | 'q4' | 'q5', number>
}

const noon = (d: string) => new Date(`${d}T12:00:00.000Z`)

export async function makeQualityFixture(): Promise<QualityFixture> {
  const s1 = await makeStaff('surgeon', { name: 'Surgeon Quality One' })
  const s2 = await makeStaff('surgeon', { name: 'Surgeon Quality Two' })
  const ortho = await makeProcedure({ code: 'ORTHO', expectedBloodLossMl: 1000 })
  const lap = await makeProcedure({ code: 'LAP', expectedBloodLossMl: 150 })
  await lap.update({ specialty: 'Colorectal surgery' })

  const episode = async (
    surgeonId: number,
    procedureId: number,
    sex: 'male' | 'female',
    ironStatus: 'absolute-deficiency' | 'iron-restricted' | 'replete' | null,
  ) => {
    const p = await makePatient({ sex })
    const r = await makeReferral({ patientId: p.id, procedureId, surgeonId }, { stage: 'operated', ironStatus })
    return { referralId: r.id, patientId: p.id }
  }
  const hb = (e: { referralId: number; patientId: number }, day: string, hbGL: number) =>
    Result.create({
      referralId: e.referralId,
      patientId: e.patientId,
      analyte: 'hb',
      valueCanonical: hbGL,
      unitCanonical: 'g/L',
      valueReported: hbGL,
      unitReported: 'g/L',
      takenAt: noon(day),
      enteredBy: null,
      derivedFrom: null,
    })
  const outcome = (e: { referralId: number }, surgeryDate: string, o: Partial<Outcome> = {}) =>
    Outcome.create({
      referralId: e.referralId,
      surgeryDate,
      bloodLossMl: 600,
      unitsTransfusedIntraOp: 0,
      unitsTransfusedPostOp: 0,
      unitsCrossmatched: 2,
      lowestHbGL: 80,
      dischargeHbGL: null,
      lengthOfStayDays: 4,
      complications: ['none'],
      recordedBy: null,
      ...o,
    })
  const tx = (e: { referralId: number }, day: string, o: Partial<Transfusion>) =>
    Transfusion.create({
      referralId: e.referralId,
      givenAt: noon(day),
      phase: 'after-surgery',
      component: 'red-cells',
      units: 1,
      preTransfusionHbGL: null,
      postTransfusionHbGL: null,
      reassessedBeforeNext: false,
      informationGiven: false,
      productCodes: [],
      reason: null,
      thresholdGL: 80,
      thresholdBasis: 'Orthopaedic surgery: 80 g/L (AABB 2023)',
      recordedBy: null,
      ...o,
    })

  const q1 = await episode(s1.id, ortho.id, 'female', 'absolute-deficiency')
  await hb(q1, '2025-02-01', 100)
  const rx = await Prescription.create({
    referralId: q1.referralId,
    productCode: 'ferric-carboxymaltose',
    route: 'iv',
    weightKg: 70,
    hbGL: 100,
    targetHbGL: 150,
    deficitMg: 1000,
    totalMg: 1000,
    firstDoseDate: '2025-02-05',
    plan: { doses: [], warnings: [] },
    cautions: {} as never,
    overrideReason: null,
    status: 'completed',
    prescribedBy: null,
    prescribedAt: noon('2025-02-03'),
  })
  await Administration.create({
    prescriptionId: rx.id,
    referralId: q1.referralId,
    doseMg: 1000,
    givenAt: noon('2025-02-05'),
    batchNumber: 'B1',
    reaction: 'none',
    reactionNotes: null,
    givenBy: null,
  })
  await hb(q1, '2025-03-08', 118)
  await outcome(q1, '2025-03-10', {
    tranexamicAcidGiven: true,
    tranexamicAcidDoseMg: 1000,
    tranexamicAcidTiming: 'before-incision',
    postOperativeIronGiven: true,
  })
  await tx(q1, '2025-03-10', { preTransfusionHbGL: 75, reassessedBeforeNext: true, postTransfusionHbGL: 82, informationGiven: true })
  await tx(q1, '2025-03-11', { preTransfusionHbGL: 78, reassessedBeforeNext: true, postTransfusionHbGL: 86, informationGiven: true })

  const q2 = await episode(s1.id, ortho.id, 'male', 'iron-restricted')
  await hb(q2, '2025-03-20', 125)
  await outcome(q2, '2025-04-01', { tranexamicAcidGiven: false })
  await tx(q2, '2025-04-01', { units: 2, preTransfusionHbGL: 70 })
  await SurgeryDateChange.create({
    referralId: q2.referralId,
    fromDate: '2025-03-15',
    toDate: '2025-04-01',
    reason: 'anaemia',
    note: null,
    changedBy: s1.id,
    changedAt: noon('2025-03-01'),
  })

  const q3 = await episode(s2.id, lap.id, 'female', 'replete')
  await hb(q3, '2025-04-01', 140)
  await outcome(q3, '2025-05-20', { transfusionInformationGiven: true })
  await tx(q3, '2025-05-21', { component: 'platelets', thresholdGL: 70 })
  await SurgeryDateChange.create({
    referralId: q3.referralId,
    fromDate: '2025-05-01',
    toDate: '2025-05-20',
    reason: 'theatre-capacity',
    note: null,
    changedBy: null,
    changedAt: noon('2025-04-10'),
  })

  const q4 = await episode(s2.id, ortho.id, 'female', null)
  await outcome(q4, '2025-06-10')

  const q5 = await episode(s1.id, ortho.id, 'female', 'absolute-deficiency')
  await outcome(q5, '2024-12-15')
  await tx(q5, '2024-12-15', { units: 3, preTransfusionHbGL: 60 })

  await factsAfterHandWrites()
  return { s1, s2, ids: { q1: q1.referralId, q2: q2.referralId, q3: q3.referralId, q4: q4.referralId, q5: q5.referralId } }
}
