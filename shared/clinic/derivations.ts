import { egfrCkdEpi2021, tibcFromTransferrin, tsatFromIron, type Sex } from '../clinical'
import { ageOn } from '../pathway/dates'

/**
 * Results derived from other results, one copy for typed-in and imported results. Each is
 * stored as its own row marked 'derived', naming the rows it came from.
 */
const round1 = (n: number) => Math.round(n * 10) / 10

export interface SampleRow {
  id: number
  analyte: string
  valueCanonical: number
}

/**
 * TSAT from serum iron and transferrin (or TIBC) of one sample, unless the lab reported a TSAT
 * for that sample itself; the newest entry of each analyte counts. Iron above the binding
 * capacity is a unit or typing error (ClinicalInputError).
 */
export function tsatFromSample(rows: readonly SampleRow[]): { value: number; derivedFrom: [number, number] } | null {
  const latest = (analyte: string) => rows.filter((r) => r.analyte === analyte).sort((a, b) => b.id - a.id)[0]
  if (latest('tsat')) return null
  const iron = latest('iron')
  const tibc = latest('tibc') ?? latest('transferrin')
  if (!iron || !tibc) return null
  const tibcUmolL = tibc.analyte === 'tibc' ? tibc.valueCanonical : tibcFromTransferrin(tibc.valueCanonical)
  return { value: round1(tsatFromIron({ ironUmolL: iron.valueCanonical, tibcUmolL })), derivedFrom: [iron.id, tibc.id] }
}

/**
 * eGFR by CKD-EPI 2021 from a creatinine; null for under-18s, whom the equation excludes. Age
 * is counted on the clinic's calendar day of the sample (`takenOn`, from dateInZone).
 */
export function egfrFromCreatinine(creatinineUmolL: number, takenOn: string, patient: { dateOfBirth: string; sex: Sex }): number | null {
  const age = ageOn(patient.dateOfBirth, takenOn)
  if (age < 18) return null
  return round1(egfrCkdEpi2021({ creatinineUmolL, ageYears: age, sex: patient.sex }))
}
