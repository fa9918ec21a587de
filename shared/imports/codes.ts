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
  return LOINC_BY_CODE.get(code.trim())
}

/**
 * Test codes as laboratory exports commonly spell them (common practice, not a standard);
 * a source's saved mapping can add its own. Matching ignores case and spaces.
 */
export const LAB_TEST_CODES: Readonly<Record<string, Analyte>> = {
  HB: 'hb',
  HGB: 'hb',
  HAEMOGLOBIN: 'hb',
  HEMOGLOBIN: 'hb',
  MCV: 'mcv',
  FER: 'ferritin',
  FERR: 'ferritin',
  FERRITIN: 'ferritin',
  TSAT: 'tsat',
  TRANSFERRINSATURATION: 'tsat',
  IRONSATURATION: 'tsat',
  FE: 'iron',
  IRON: 'iron',
  SERUMIRON: 'iron',
  TRF: 'transferrin',
  TRANSFERRIN: 'transferrin',
  TIBC: 'tibc',
  CRP: 'crp',
  CREA: 'creatinine',
  CREAT: 'creatinine',
  CREATININE: 'creatinine',
  B12: 'b12',
  VITB12: 'b12',
  VITAMINB12: 'b12',
  FOL: 'folate',
  FOLATE: 'folate',
  SERUMFOLATE: 'folate',
}

/** How many codes have been normalised (squashed): lets a test prove an import's work stays O(rows + codes). */
export const codeWork = { squashed: 0 }

const squash = (code: string) => {
  codeWork.squashed += 1
  return code.replace(/[\s_-]+/g, '').toUpperCase()
}

type Lookup = (code: string) => Analyte | undefined

// Built once per mapping object, i.e. once per import: normalising a source's whole code list
// again for every row made a 1,000-row preview with a 5,000-code mapping cost rows × codes.
const lookups = new WeakMap<object, Lookup>()
const LOINC_BY_CODE = new Map(LOINC_CODES.map((e) => [e.code, e]))
const BY_NAME = new Map<string, Analyte>()
for (const a of ANALYTES) {
  BY_NAME.set(a.replace(/[\s_-]+/g, '').toUpperCase(), a)
  BY_NAME.set(ANALYTE_DEFS[a].label.replace(/[\s_-]+/g, '').toUpperCase(), a)
}

function buildLookup(own: Readonly<Record<string, string>>): Lookup {
  const mine = new Map<string, Analyte>()
  for (const [k, v] of Object.entries(own)) {
    const key = squash(k)
    // The first spelling wins, as the old in-order search did.
    if ((ANALYTES as readonly string[]).includes(v) && !mine.has(key)) mine.set(key, v as Analyte)
  }
  return (code) => {
    const key = squash(code)
    if (!key) return undefined
    return mine.get(key) ?? LOINC_BY_CODE.get(code.trim())?.analyte ?? LAB_TEST_CODES[key] ?? BY_NAME.get(key)
  }
}

/**
 * The analyte a CSV test code stands for: the source's own codes first, then a LOINC code,
 * then the common spellings and Ferrolane's own analyte names and labels. The source's codes
 * are normalised once per mapping object, so a whole import costs O(rows + codes).
 */
export function analyteForCode(code: string, own: Readonly<Record<string, string>> = {}): Analyte | undefined {
  let lookup = lookups.get(own)
  if (!lookup) {
    lookup = buildLookup(own)
    lookups.set(own, lookup)
  }
  return lookup(code)
}
