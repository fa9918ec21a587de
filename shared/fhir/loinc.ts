import type { StoredAnalyte } from '../pathway/analytes'

/**
 * LOINC codes for the analytes Ferrolane stores, each with its long common name (the code's
 * meaning) and the UCUM unit the value is exported in. Codes and names are from memory, checked
 * against published laboratory test catalogues that list them (e.g. iron 2498-4, TIBC 2500-7,
 * TSAT 2502-3); eGFR 98979-8 (CKD-EPI 2021, creatinine-based) is from memory.
 *
 * Iron, TIBC and creatinine: these codes are mass concentrations, while Ferrolane stores µmol/L,
 * so `fromCanonical` converts to the code's unit (the value must match the code's property).
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
}

// µmol/L ↔ µg/dL for iron: Fe 55.845 g/mol, 1 µg/dL = 0.1791 µmol/L (shared/clinical/units.ts).
const IRON_UMOL_L_PER_UG_DL = 0.1791
// Creatinine 113.12 g/mol: 1 mg/dL = 88.4 µmol/L (shared/clinical/units.ts).
const CREATININE_UMOL_L_PER_MG_DL = 88.4
const round2 = (n: number) => Math.round(n * 100) / 100

export const LOINC: Record<StoredAnalyte, LoincEntry> = {
  hb: { code: '718-7', display: 'Hemoglobin [Mass/volume] in Blood', ucum: 'g/L', unit: 'g/L' },
  mcv: { code: '787-2', display: 'MCV [Entitic volume] by Automated count', ucum: 'fL', unit: 'fL' },
  ferritin: { code: '2276-4', display: 'Ferritin [Mass/volume] in Serum or Plasma', ucum: 'ug/L', unit: 'µg/L' },
  tsat: { code: '2502-3', display: 'Iron saturation [Mass Fraction] in Serum or Plasma', ucum: '%', unit: '%' },
  iron: {
    code: '2498-4', display: 'Iron [Mass/volume] in Serum or Plasma', ucum: 'ug/dL', unit: 'µg/dL',
    fromCanonical: (umolL) => round2(umolL / IRON_UMOL_L_PER_UG_DL),
  },
  transferrin: { code: '3034-6', display: 'Transferrin [Mass/volume] in Serum or Plasma', ucum: 'g/L', unit: 'g/L' },
  tibc: {
    code: '2500-7', display: 'Iron binding capacity [Mass/volume] in Serum or Plasma', ucum: 'ug/dL', unit: 'µg/dL',
    fromCanonical: (umolL) => round2(umolL / IRON_UMOL_L_PER_UG_DL),
  },
  crp: { code: '1988-5', display: 'C reactive protein [Mass/volume] in Serum or Plasma', ucum: 'mg/L', unit: 'mg/L' },
  creatinine: {
    code: '2160-0', display: 'Creatinine [Mass/volume] in Serum or Plasma', ucum: 'mg/dL', unit: 'mg/dL',
    fromCanonical: (umolL) => round2(umolL / CREATININE_UMOL_L_PER_MG_DL),
  },
  b12: { code: '2132-9', display: 'Cobalamin (Vitamin B12) [Mass/volume] in Serum or Plasma', ucum: 'ng/L', unit: 'ng/L' },
  folate: { code: '2284-8', display: 'Folate [Mass/volume] in Serum or Plasma', ucum: 'ug/L', unit: 'µg/L' },
  egfr: {
    code: '98979-8',
    display: 'Glomerular filtration rate/1.73 sq M.predicted [Volume Rate/Area] in Serum, Plasma or Blood by Creatinine-based formula (CKD-EPI 2021)',
    ucum: 'mL/min/{1.73_m2}', unit: 'mL/min/1.73 m²',
  },
}

export const LOINC_SYSTEM = 'http://loinc.org'
export const UCUM_SYSTEM = 'http://unitsofmeasure.org'

/** The exported value and unit of a stored result. */
export function loincValue(analyte: StoredAnalyte, canonicalValue: number): { entry: LoincEntry; value: number } {
  const entry = LOINC[analyte]
  return { entry, value: entry.fromCanonical ? entry.fromCanonical(canonicalValue) : canonicalValue }
}
