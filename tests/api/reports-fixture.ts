import { QueryTypes, type Sequelize } from 'sequelize'
import { Administration, Outcome, Prescription, Result, StageTransition } from '../../server/models/index'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { factsAfterHandWrites } from '../helpers/episodeFacts'

/**
 * Four episodes in 2025 and one referred in 2024, small enough that every report figure can
 * be worked out by hand in the tests (see the comments there). Surgery-day criteria: the
 * clinic default, 'surgical' (Hb < 130 g/L for both sexes).
 *
 * E1  S1 KNEE  referred 03-01  Hb 100 (03-03)  clinic 03-08  FCM 03-10  Hb 120 (04-01)  cleared 04-02  surgery 04-10  xm 2, tx 0+1,
 * loss 600
 * E2  S1 KNEE  referred 03-05  Hb 125 (03-20)  anaemic, untreated                                      surgery 04-05  xm 2, tx 0,  
 * loss 400
 * E3  S2 HIP   referred 05-01  Hb 140 (05-02)  replete               cleared 05-03                     surgery 06-15  xm 0, tx 2+0,
 * loss 1000
 *   E4  S2 HIP   referred 06-01  not screened
 *   E5  S1 KNEE  referred 2024-12-01 (outside the period)
 */
export interface ReportFixture {
  s1: StaffFixture
  s2: StaffFixture
  ids: number[]
}

const noon = (d: string) => new Date(`${d}T12:00:00.000Z`)

export async function makeReportFixture(sequelize: Sequelize): Promise<ReportFixture> {
  const s1 = await makeStaff('surgeon', { name: 'Surgeon One' })
  const s2 = await makeStaff('surgeon', { name: 'Surgeon Two' })
  const knee = await makeProcedure({ code: 'KNEE', expectedBloodLossMl: 500 })
  await knee.update({ usualBloodOrder: 'crossmatch', usualUnits: 2 })
  const hip = await makeProcedure({ code: 'HIP', expectedBloodLossMl: 1000 })
  const ids: number[] = []

  const episode = async (
    surgeonId: number,
    procedureId: number,
    referredOn: string,
    o: { anaemic?: boolean; stage?: 'operated' | 'referred' } = {},
  ) => {
    const p = await makePatient()
    const r = await makeReferral(
      { patientId: p.id, procedureId, surgeonId },
      { stage: o.stage ?? 'operated', anaemic: o.anaemic ?? null, ironStatus: o.anaemic === false ? 'replete' : null },
    )
    await sequelize.query('UPDATE referrals SET created_at = ? WHERE id = ?', {
      type: QueryTypes.UPDATE,
      replacements: [`${referredOn} 12:00:00`, r.id],
    })
    ids.push(r.id)
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
  const move = (e: { referralId: number }, toStage: 'clinic' | 'cleared', day: string) =>
    StageTransition.create({ referralId: e.referralId, fromStage: null, toStage, reason: null, userId: null, at: noon(day) })
  const outcome = (e: { referralId: number }, surgeryDate: string, xm: number, intra: number, post: number, lossMl: number) =>
    Outcome.create({
      referralId: e.referralId,
      surgeryDate,
      bloodLossMl: lossMl,
      unitsTransfusedIntraOp: intra,
      unitsTransfusedPostOp: post,
      unitsCrossmatched: xm,
      lowestHbGL: 90,
      dischargeHbGL: null,
      lengthOfStayDays: 3,
      complications: ['none'],
      recordedBy: null,
    })

  const e1 = await episode(s1.id, knee.id, '2025-03-01', { anaemic: true })
  await hb(e1, '2025-03-03', 100)
  await move(e1, 'clinic', '2025-03-08')
  const rx = await Prescription.create({
    referralId: e1.referralId,
    productCode: 'ferric-carboxymaltose',
    route: 'iv',
    weightKg: 70,
    hbGL: 100,
    targetHbGL: 150,
    deficitMg: 1000,
    totalMg: 1000,
    firstDoseDate: '2025-03-10',
    plan: { doses: [], warnings: [] },
    cautions: {} as never,
    overrideReason: null,
    status: 'completed',
    prescribedBy: null,
    prescribedAt: noon('2025-03-08'),
  })
  await Administration.create({
    prescriptionId: rx.id,
    referralId: e1.referralId,
    doseMg: 1000,
    givenAt: noon('2025-03-10'),
    batchNumber: 'B1',
    reaction: 'none',
    reactionNotes: null,
    givenBy: null,
  })
  await hb(e1, '2025-04-01', 120)
  await move(e1, 'cleared', '2025-04-02')
  await outcome(e1, '2025-04-10', 2, 0, 1, 600)

  const e2 = await episode(s1.id, knee.id, '2025-03-05', { anaemic: true })
  await hb(e2, '2025-03-20', 125)
  await outcome(e2, '2025-04-05', 2, 0, 0, 400)

  const e3 = await episode(s2.id, hip.id, '2025-05-01', { anaemic: false })
  await hb(e3, '2025-05-02', 140)
  await move(e3, 'cleared', '2025-05-03')
  await outcome(e3, '2025-06-15', 0, 2, 0, 1000)

  await episode(s2.id, hip.id, '2025-06-01', { stage: 'referred' })
  await episode(s1.id, knee.id, '2024-12-01', { stage: 'referred' })
  // Written straight to the tables: the reports' pre-aggregates are built from scratch after them.
  await factsAfterHandWrites()
  return { s1, s2, ids }
}

/** A small RFC 4180 reader (quoted fields, doubled quotes, CRLF), so the test needs no library. */
export function parseCsv(text: string): Record<string, string>[] {
  const records: string[][] = []
  let row: string[] = []
  let cell = ''
  let quoted = false
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"'
        i++
      } else if (ch === '"') quoted = false
      else cell += ch
    } else if (ch === '"') quoted = true
    else if (ch === ',') {
      row.push(cell)
      cell = ''
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++
      row.push(cell)
      records.push(row)
      row = []
      cell = ''
    } else cell += ch
  }
  if (cell !== '' || row.length) {
    row.push(cell)
    records.push(row)
  }
  const [header, ...rest] = records
  return rest.map((r) => Object.fromEntries(header!.map((h, i) => [h, r[i] ?? ''])))
}

/** The JSON cell as the CSV writes it. */
export const asCsvCell = (v: unknown) => (v == null ? '' : String(v))
