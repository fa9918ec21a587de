import { Administration, ClinicReview, IronProductRow, Prescription, Result, User } from '../../models/index'
import { FINAL_WHERE } from '../../models/result'
import { DIAGNOSIS_LABELS } from '../../../shared/clinic/diagnoses'
import { VERDICT_LABELS } from '../../../shared/clinic/readiness'
import { AppError } from '../../errors'
import type { LoadedReferral } from '../episode'
import { projectionForReferral } from '../projection'

export interface LatestResult {
  value: number
  unit: string
  takenAt: Date
}

/** What the family-doctor letter reports, gathered from the episode as it is now. */
export interface LetterFacts {
  hb: LatestResult | null
  ferritin: LatestResult | null
  tsat: LatestResult | null
  review: { diagnosis: string; plan: string; reviewedAt: Date } | null
  doses: { productName: string; route: 'iv' | 'oral'; doseMg: number; givenAt: Date }[]
  readiness: { verdict: string; predictedSurgeryHbGL: number } | { unavailable: string }
  surgeonName: string
}

async function latest(referralId: number, analyte: string): Promise<LatestResult | null> {
  // A letter states the laboratory's final values only: never a voided or preliminary one.
  const r = await Result.findOne({
    where: { referralId, analyte, ...FINAL_WHERE },
    order: [
      ['takenAt', 'DESC'],
      ['id', 'DESC'],
    ],
    raw: true,
  })
  return r ? { value: r.valueCanonical, unit: r.unitCanonical, takenAt: r.takenAt } : null
}

export async function letterFacts(r: LoadedReferral): Promise<LetterFacts> {
  const [hb, ferritin, tsat, review, doses, surgeon] = await Promise.all([
    latest(r.id, 'hb'),
    latest(r.id, 'ferritin'),
    latest(r.id, 'tsat'),
    ClinicReview.findOne({
      where: { referralId: r.id },
      order: [
        ['reviewedAt', 'DESC'],
        ['id', 'DESC'],
      ],
      raw: true,
    }),
    Administration.findAll({
      where: { referralId: r.id },
      order: [
        ['givenAt', 'ASC'],
        ['id', 'ASC'],
      ],
      raw: true,
    }),
    User.findByPk(r.surgeonId, { attributes: ['name'], raw: true }),
  ])
  const rxIds = [...new Set(doses.map((d) => d.prescriptionId))]
  const rxs = rxIds.length
    ? await Prescription.findAll({ where: { id: rxIds }, attributes: ['id', 'productCode', 'route'], raw: true })
    : []
  const products = rxs.length
    ? await IronProductRow.findAll({ where: { code: rxs.map((p) => p.productCode) }, attributes: ['code', 'name'], raw: true })
    : []
  const nameOf = new Map(products.map((p) => [p.code, p.name]))
  const rxOf = new Map(rxs.map((p) => [p.id, p]))

  let readiness: LetterFacts['readiness']
  try {
    const p = await projectionForReferral(r)
    readiness = { verdict: VERDICT_LABELS[p.readiness.verdict], predictedSurgeryHbGL: p.predictedSurgeryHbGL }
  } catch (err) {
    // A projection that cannot be made (no weight, no usual blood loss) is stated, not invented.
    if (!(err instanceof AppError)) throw err
    readiness = { unavailable: err.message }
  }
  return {
    hb,
    ferritin,
    tsat,
    review: review ? { diagnosis: DIAGNOSIS_LABELS[review.diagnosis], plan: review.plan, reviewedAt: review.reviewedAt } : null,
    doses: doses.map((d) => {
      const rx = rxOf.get(d.prescriptionId)
      return {
        productName: rx ? (nameOf.get(rx.productCode) ?? rx.productCode) : 'Iron (product not recorded)',
        route: rx?.route ?? 'iv',
        doseMg: d.doseMg,
        givenAt: d.givenAt,
      }
    }),
    readiness,
    surgeonName: surgeon?.name ?? 'the operating surgeon',
  }
}
