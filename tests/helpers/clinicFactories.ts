import { IronProductRow, PatientMeasurement, Result } from '../../server/models/index'
import { starterFormularyRows } from '../../seed/formulary'
import { makePatient, makeProcedure, makeReferral, type PatientOverrides, type ReferralOverrides } from './pathwayFactories'
import type { Sex } from '../../shared/clinical'

export async function loadStarterFormulary(): Promise<void> {
  await IronProductRow.bulkCreate(starterFormularyRows())
}

export interface EpisodeSpec {
  sex?: Sex
  heightCm?: number | null
  weightKg?: number | null
  weightMeasuredAt?: Date
  hb?: { hbGL: number; takenAt?: Date }[]
  expectedBloodLossMl?: number | null
  surgeonId: number
  referral?: Partial<ReferralOverrides>
  patient?: Partial<PatientOverrides>
}

/** A patient, an operation and a referral with Hb results, straight in the database. */
export async function makeEpisode(spec: EpisodeSpec) {
  const patient = await makePatient({ sex: spec.sex ?? 'female', ...spec.patient, weightKg: null })
  if (spec.weightKg !== null) {
    await PatientMeasurement.create({
      patientId: patient.id, heightCm: spec.heightCm === undefined ? 165 : spec.heightCm, weightKg: spec.weightKg ?? 70,
      measuredAt: spec.weightMeasuredAt ?? new Date(), recordedBy: null,
    })
  }
  const procedure = await makeProcedure({ expectedBloodLossMl: spec.expectedBloodLossMl === undefined ? 1000 : spec.expectedBloodLossMl })
  const hb = spec.hb ?? [{ hbGL: 110 }]
  const last = hb[hb.length - 1]
  const referral = await makeReferral(
    { patientId: patient.id, procedureId: procedure.id, surgeonId: spec.surgeonId },
    { stage: 'clinic', anaemic: true, ironStatus: 'absolute-deficiency', latestHbGL: last?.hbGL ?? null, latestHbAt: last ? (last.takenAt ?? new Date()) : null, ...spec.referral },
  )
  for (const h of hb) {
    await Result.create({
      referralId: referral.id, patientId: patient.id, analyte: 'hb', valueCanonical: h.hbGL, unitCanonical: 'g/L', valueReported: h.hbGL,
      unitReported: 'g/L', takenAt: h.takenAt ?? new Date(Date.now() - 60_000), enteredBy: null, derivedFrom: null,
    })
  }
  return { patient, procedure, referral }
}
