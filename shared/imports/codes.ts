import { ANALYTES, ANALYTE_DEFS, type Analyte } from '../pathway/analytes'
import { LOINC, LOINC_ALSO_READ, LOINC_SOURCE, LOINC_SYSTEM } from '../fhir/loinc'

export interface LoincEntry {
  code: string
  analyte: Analyte
  /** The code's long common name, as we know it. */
  longName: string
  /** Where the code–meaning pair was checked. */
  source: string
}

/**
 * The codes an import reads, derived from the one LOINC table (shared/fhir/loinc.ts) that the
 * export writes with: each stored analyte's code (eGFR is left out: Ferrolane works it out from
 * creatinine) and the molar forms laboratories also send.
 */
export const LOINC_CODES: readonly LoincEntry[] = [
  ...ANALYTES.map((analyte) => ({ code: LOINC[analyte].code, analyte, longName: LOINC[analyte].display, source: LOINC_SOURCE })),
  ...LOINC_ALSO_READ.map((e) => ({ code: e.code, analyte: e.analyte, longName: e.display, source: LOINC_SOURCE })),
]

export { LOINC_SYSTEM }

/** LOINC codes of values Ferrolane derives itself; an import skips them rather than refusing them. */
export const DERIVED_LOINC: Readonly<Record<string, string>> = { [LOINC.egfr.code]: 'eGFR' }

export function analyteForLoinc(code: string): LoincEntry | undefined {
  return LOINC_CODES.find((e) => e.code === code.trim())
}

/**
 * Test codes as laboratory exports commonly spell them (common practice, not a standard);
 * a source's saved mapping can add its own. Matching ignores case and spaces.
 */
export const LAB_TEST_CODES: Readonly<Record<string, Analyte>> = {
  HB: 'hb', HGB: 'hb', HAEMOGLOBIN: 'hb', HEMOGLOBIN: 'hb',
  MCV: 'mcv',
  FER: 'ferritin', FERR: 'ferritin', FERRITIN: 'ferritin',
  TSAT: 'tsat', 'TRANSFERRINSATURATION': 'tsat', 'IRONSATURATION': 'tsat',
  FE: 'iron', IRON: 'iron', 'SERUMIRON': 'iron',
  TRF: 'transferrin', TRANSFERRIN: 'transferrin',
  TIBC: 'tibc',
  CRP: 'crp',
  CREA: 'creatinine', CREAT: 'creatinine', CREATININE: 'creatinine',
  B12: 'b12', VITB12: 'b12', 'VITAMINB12': 'b12',
  FOL: 'folate', FOLATE: 'folate', 'SERUMFOLATE': 'folate',
}

const squash = (code: string) => code.replace(/[\s_-]+/g, '').toUpperCase()

/**
 * The analyte a CSV test code stands for: the source's own codes first, then a LOINC code,
 * then the common spellings and Ferrolane's own analyte names and labels.
 */
export function analyteForCode(code: string, own: Readonly<Record<string, string>> = {}): Analyte | undefined {
  const key = squash(code)
  if (!key) return undefined
  for (const [k, v] of Object.entries(own)) if (squash(k) === key && (ANALYTES as readonly string[]).includes(v)) return v as Analyte
  const loinc = analyteForLoinc(code)
  if (loinc) return loinc.analyte
  if (LAB_TEST_CODES[key]) return LAB_TEST_CODES[key]
  return ANALYTES.find((a) => squash(a) === key || squash(ANALYTE_DEFS[a].label) === key)
}
