import type { Analyte, StoredAnalyte } from '../pathway/analytes'
import { CREATININE_UMOL_L_PER_MG_DL, IRON_UMOL_L_PER_UG_DL } from '../clinical/units'

/**
 * Ferrolane's one LOINC table: the code each stored analyte is exported with, its long common
 * name (the code's meaning) and the UCUM unit of the exported value; the import reads the same
 * codes back (shared/imports/codes.ts derives its lookup from here). Codes and names are from
 * memory of the LOINC table (Regenstrief), checked against published laboratory test catalogues
 * that list them (e.g. iron 2498-4, TIBC 2500-7, TSAT 2502-3); the pairs named in issue #7 (Hb,
 * MCV, ferritin, TSAT, CRP, creatinine, B12, folate) are also the list. eGFR 98979-8
 * (CKD-EPI 2021, creatinine-based) is from memory.
 *
 * Iron, TIBC and creatinine: these codes are mass concentrations, while Ferrolane stores µmol/L,
 * so `fromCanonical` converts to the code's unit (the value must match the code's property) and
 * `toCanonical` converts an imported value in that unit back.
 */
export interface LoincEntry {
  code: string
  /** LOINC long common name: what the code means. */
  display: string
  /** UCUM code of the exported value, and the same unit as people write it. */
  ucum: string
  unit: string
  /** Converts the stored canonical value into `unit`; absent when they are the same. */
  fromCanonical?: (value: number) => number
  /** The inverse, for a value imported in `unit`. */
  toCanonical?: (value: number) => number
}

// The codes were written from memory and checked against published laboratory test catalogues;
// what the import screen shows must not say "from memory", so it asks for the local check.
export const LOINC_SOURCE = "LOINC table (Regenstrief); check each code against your laboratory's catalogue (local policy)"

const round2 = (n: number) => Math.round(n * 100) / 100
// µmol/L ↔ µg/dL for iron (Fe 55.845 g/mol) and creatinine (113.12 g/mol): shared/clinical/units.ts.
const massOf = (factor: number) => ({
  fromCanonical: (umolL: number) => round2(umolL / factor),
  toCanonical: (mass: number) => mass * factor,
})

export const LOINC: Record<StoredAnalyte, LoincEntry> = {
  hb: { code: '718-7', display: 'Hemoglobin [Mass/volume] in Blood', ucum: 'g/L', unit: 'g/L' },
  mcv: { code: '787-2', display: 'MCV [Entitic volume] by Automated count', ucum: 'fL', unit: 'fL' },
  ferritin: { code: '2276-4', display: 'Ferritin [Mass/volume] in Serum or Plasma', ucum: 'ug/L', unit: 'µg/L' },
  tsat: { code: '2502-3', display: 'Iron saturation [Mass Fraction] in Serum or Plasma', ucum: '%', unit: '%' },
  iron: {
    code: '2498-4',
    display: 'Iron [Mass/volume] in Serum or Plasma',
    ucum: 'ug/dL',
    unit: 'µg/dL',
    ...massOf(IRON_UMOL_L_PER_UG_DL),
  },
  transferrin: { code: '3034-6', display: 'Transferrin [Mass/volume] in Serum or Plasma', ucum: 'g/L', unit: 'g/L' },
  tibc: {
    code: '2500-7',
    display: 'Iron binding capacity [Mass/volume] in Serum or Plasma',
    ucum: 'ug/dL',
    unit: 'µg/dL',
    ...massOf(IRON_UMOL_L_PER_UG_DL),
  },
  crp: { code: '1988-5', display: 'C reactive protein [Mass/volume] in Serum or Plasma', ucum: 'mg/L', unit: 'mg/L' },
  creatinine: {
    code: '2160-0',
    display: 'Creatinine [Mass/volume] in Serum or Plasma',
    ucum: 'mg/dL',
    unit: 'mg/dL',
    ...massOf(CREATININE_UMOL_L_PER_MG_DL),
  },
  b12: { code: '2132-9', display: 'Cobalamin (Vitamin B12) [Mass/volume] in Serum or Plasma', ucum: 'ng/L', unit: 'ng/L' },
  folate: { code: '2284-8', display: 'Folate [Mass/volume] in Serum or Plasma', ucum: 'ug/L', unit: 'µg/L' },
  phosphate: { code: '14879-1', display: 'Phosphate [Moles/volume] in Serum or Plasma', ucum: 'mmol/L', unit: 'mmol/L' },
  egfr: {
    code: '98979-8',
    display:
      'Glomerular filtration rate/1.73 sq M.predicted [Volume Rate/Area] in Serum, Plasma or Blood by Creatinine-based formula ' +
      '(CKD-EPI 2021)',
    ucum: 'mL/min/{1.73_m2}',
    unit: 'mL/min/1.73 m²',
  },
}

/** Molar forms laboratories also send (same analyte, µmol/L); read on import, never exported. */
export const LOINC_ALSO_READ: readonly { code: string; analyte: Analyte; display: string }[] = [
  { code: '14798-3', analyte: 'iron', display: 'Iron [Moles/volume] in Serum or Plasma' },
  { code: '14682-9', analyte: 'creatinine', display: 'Creatinine [Moles/volume] in Serum or Plasma' },
]

export const LOINC_SYSTEM = 'http://loinc.org'
export const UCUM_SYSTEM = 'http://unitsofmeasure.org'

/** The exported value and unit of a stored result. */
export function loincValue(analyte: StoredAnalyte, canonicalValue: number): { entry: LoincEntry; value: number } {
  const entry = LOINC[analyte]
  return { entry, value: entry.fromCanonical ? entry.fromCanonical(canonicalValue) : canonicalValue }
}
