import { IronProductRow, PatientMeasurement, Result } from '../../server/models/index'
import { starterFormularyRows } from '../../seed/formulary'
import { makePatient, makeProcedure, makeReferral, type PatientOverrides, type ReferralOverrides } from './pathwayFactories'
import type { Sex } from '../../shared/clinical'
import type { StoredAnalyte } from '../../shared/pathway/analytes'

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
  /**
   * Iron studies stored as results. By default they match the referral's iron status (ferritin
   * 15 µg/L for absolute deficiency; ferritin 150 µg/L with TSAT 25 % for replete; ferritin 50 µg/L
   * alone for indeterminate), taken now,
   * so the verdict, which reads the dated results, agrees with the stored status. null: none.
   */
  iron?: { ferritinUgL: number; tsatPct?: number; crpMgL?: number; takenAt?: Date } | null
}

const IRON_FOR_STATUS: Record<string, EpisodeSpec['iron']> = {
  'absolute-deficiency': { ferritinUgL: 15 },
  replete: { ferritinUgL: 150, tsatPct: 25 },
  indeterminate: { ferritinUgL: 50 },
}

/** A patient, an operation and a referral with Hb results, straight in the database. */
export async function makeEpisode(spec: EpisodeSpec) {
  const patient = await makePatient({ sex: spec.sex ?? 'female', ...spec.patient, weightKg: null })
  if (spec.weightKg !== null) {
    await PatientMeasurement.create({
      patientId: patient.id,
      heightCm: spec.heightCm === undefined ? 165 : spec.heightCm,
      weightKg: spec.weightKg ?? 70,
      measuredAt: spec.weightMeasuredAt ?? new Date(),
      recordedBy: null,
    })
  }
  const procedure = await makeProcedure({ expectedBloodLossMl: spec.expectedBloodLossMl === undefined ? 1000 : spec.expectedBloodLossMl })
  const hb = spec.hb ?? [{ hbGL: 110 }]
  const last = hb[hb.length - 1]
  const referral = await makeReferral(
    { patientId: patient.id, procedureId: procedure.id, surgeonId: spec.surgeonId },
    {
      stage: 'clinic',
      anaemic: true,
      ironStatus: 'absolute-deficiency',
      latestHbGL: last?.hbGL ?? null,
      latestHbAt: last ? (last.takenAt ?? new Date()) : null,
      ...spec.referral,
    },
  )
  for (const h of hb) {
    await Result.create({
      referralId: referral.id,
      patientId: patient.id,
      analyte: 'hb',
      valueCanonical: h.hbGL,
      unitCanonical: 'g/L',
      valueReported: h.hbGL,
      unitReported: 'g/L',
      takenAt: h.takenAt ?? new Date(Date.now() - 60_000),
      enteredBy: null,
      derivedFrom: null,
    })
  }
  const iron = spec.iron === undefined ? IRON_FOR_STATUS[referral.ironStatus ?? ''] : spec.iron
  if (iron) {
    const takenAt = iron.takenAt ?? new Date(Date.now() - 60_000)
    const rows: [StoredAnalyte, number | undefined, string][] = [
      ['ferritin', iron.ferritinUgL, 'µg/L'],
      ['tsat', iron.tsatPct, '%'],
      ['crp', iron.crpMgL, 'mg/L'],
    ]
    for (const [analyte, value, unit] of rows) {
      if (value === undefined) continue
      await Result.create({
        referralId: referral.id,
        patientId: patient.id,
        analyte,
        valueCanonical: value,
        unitCanonical: unit,
        valueReported: value,
        unitReported: unit,
        takenAt,
        enteredBy: null,
        derivedFrom: null,
      })
    }
  }
  return { patient, procedure, referral }
}
