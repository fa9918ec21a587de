import { ANALYTES, ANALYTE_DEFS, type Analyte } from '../pathway/analytes'

export interface LoincEntry {
  code: string
  analyte: Analyte
  /** The code's long common name, as we know it. */
  longName: string
  /** Where the code–meaning pair was checked. */
  source: string
}

// Every long name below is from memory of the LOINC table (Regenstrief); the pairs named in
// issue #7 (Hb, MCV, ferritin, TSAT, CRP, creatinine, B12, folate) are also the issue's list.
const MEMORY = 'LOINC table, from memory'
const ISSUE = 'LOINC table, from memory; code–analyte pair as listed in issue #7'

export const LOINC_CODES: readonly LoincEntry[] = [
  { code: '718-7', analyte: 'hb', longName: 'Hemoglobin [Mass/volume] in Blood', source: ISSUE },
  { code: '787-2', analyte: 'mcv', longName: 'MCV [Entitic volume] by Automated count', source: ISSUE },
  { code: '2276-4', analyte: 'ferritin', longName: 'Ferritin [Mass/volume] in Serum or Plasma', source: ISSUE },
  { code: '2502-3', analyte: 'tsat', longName: 'Iron saturation [Mass Fraction] in Serum or Plasma', source: ISSUE },
  { code: '2498-4', analyte: 'iron', longName: 'Iron [Mass/volume] in Serum or Plasma', source: MEMORY },
  { code: '14798-3', analyte: 'iron', longName: 'Iron [Moles/volume] in Serum or Plasma', source: MEMORY },
  { code: '3034-6', analyte: 'transferrin', longName: 'Transferrin [Mass/volume] in Serum or Plasma', source: MEMORY },
  { code: '2500-7', analyte: 'tibc', longName: 'Iron binding capacity [Mass/volume] in Serum or Plasma', source: MEMORY },
  { code: '1988-5', analyte: 'crp', longName: 'C reactive protein [Mass/volume] in Serum or Plasma', source: ISSUE },
  { code: '2160-0', analyte: 'creatinine', longName: 'Creatinine [Mass/volume] in Serum or Plasma', source: ISSUE },
  { code: '14682-9', analyte: 'creatinine', longName: 'Creatinine [Moles/volume] in Serum or Plasma', source: MEMORY },
  { code: '2132-9', analyte: 'b12', longName: 'Cobalamin (Vitamin B12) [Mass/volume] in Serum or Plasma', source: ISSUE },
  { code: '2284-8', analyte: 'folate', longName: 'Folate [Mass/volume] in Serum or Plasma', source: ISSUE },
]

export const LOINC_SYSTEM = 'http://loinc.org'

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
