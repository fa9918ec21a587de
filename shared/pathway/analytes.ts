import { CLINICAL_LIMITS, convertHb, creatinineMgDlToUmolL, ironUgDlToUmolL, type Limit } from '../clinical'

/** What a person may enter. Derived values (TSAT from iron, eGFR) are added by the server. */
export const ANALYTES = [
  'hb',
  'mcv',
  'ferritin',
  'tsat',
  'iron',
  'transferrin',
  'tibc',
  'crp',
  'creatinine',
  'b12',
  'folate',
  'phosphate',
] as const
export type Analyte = (typeof ANALYTES)[number]
/** Stored results also include what the server derives. */
export type StoredAnalyte = Analyte | 'egfr'

export function isAnalyte(value: unknown): value is Analyte {
  return typeof value === 'string' && (ANALYTES as readonly string[]).includes(value)
}

interface UnitRule {
  limit: Limit
  toCanonical: (value: number) => number
}

interface AnalyteDef {
  label: string
  canonicalUnit: string
  units: Record<string, UnitRule>
}

const same = (limit: Limit): UnitRule => ({ limit, toCanonical: (v) => v })
/** A unit with a fixed factor to canonical; its plausible range is the canonical one scaled back. */
const scaled = (canonical: Limit, unit: string, factor: number): UnitRule => ({
  limit: { min: canonical.min / factor, max: canonical.max / factor, unit },
  toCanonical: (v) => v * factor,
})

// Ranges for analytes the clinical library does not cover: wide on purpose (common practice),
// so only unit mix-ups and typing slips are refused.
const MCV_FL: Limit = { min: 50, max: 150, unit: 'fL' }
const B12_NG_L: Limit = { min: 20, max: 10000, unit: 'ng/L' }
const FOLATE_UG_L: Limit = { min: 0.2, max: 100, unit: 'µg/L' }
// Folic acid 441.4 g/mol: 1 nmol/L = 0.4413 µg/L (from memory; not in the clinical reference).
export const FOLATE_UG_L_PER_NMOL_L = 0.4413

// A TSAT under 1 % is not a result a laboratory reports: it is a fraction typed in (0.15 for
// 15 %). The derived TSAT (from iron and TIBC) keeps the library's 0–100 % range.
const TSAT_ENTRY_PCT: Limit = { min: 1, max: 100, unit: '%' }
// Serum phosphate: wide on purpose (common practice); mg/dL of phosphorus × 0.3229 = mmol/L
// (P 30.97 g/mol; from memory).
const PHOSPHATE_MMOL_L: Limit = { min: 0.1, max: 5, unit: 'mmol/L' }
export const PHOSPHATE_MMOL_L_PER_MG_DL = 0.3229
// CRP: 1 mg/dL = 10 mg/L (unit arithmetic).
export const CRP_MG_L_PER_MG_DL = 10

const L = CLINICAL_LIMITS
export const ANALYTE_DEFS: Record<Analyte, AnalyteDef> = {
  hb: {
    label: 'Haemoglobin',
    canonicalUnit: 'g/L',
    units: {
      'g/L': { limit: L.hbGL, toCanonical: (v) => convertHb(v, 'g/L', 'g/L') },
      'g/dL': { limit: L.hbGDl, toCanonical: (v) => convertHb(v, 'g/dL', 'g/L') },
      'mmol/L': { limit: L.hbMmolL, toCanonical: (v) => convertHb(v, 'mmol/L', 'g/L') },
    },
  },
  mcv: { label: 'MCV', canonicalUnit: 'fL', units: { fL: same(MCV_FL) } },
  ferritin: {
    label: 'Ferritin',
    canonicalUnit: 'µg/L',
    units: { 'µg/L': same(L.ferritinUgL), 'ng/mL': same({ ...L.ferritinUgL, unit: 'ng/mL' }) },
  },
  tsat: { label: 'Transferrin saturation', canonicalUnit: '%', units: { '%': same(TSAT_ENTRY_PCT) } },
  iron: {
    label: 'Serum iron',
    canonicalUnit: 'µmol/L',
    units: { 'µmol/L': same(L.ironUmolL), 'µg/dL': { limit: L.ironUgDl, toCanonical: ironUgDlToUmolL } },
  },
  transferrin: { label: 'Transferrin', canonicalUnit: 'g/L', units: { 'g/L': same(L.transferrinGL) } },
  tibc: { label: 'TIBC', canonicalUnit: 'µmol/L', units: { 'µmol/L': same(L.tibcUmolL) } },
  crp: { label: 'CRP', canonicalUnit: 'mg/L', units: { 'mg/L': same(L.crpMgL), 'mg/dL': scaled(L.crpMgL, 'mg/dL', CRP_MG_L_PER_MG_DL) } },
  creatinine: {
    label: 'Creatinine',
    canonicalUnit: 'µmol/L',
    units: { 'µmol/L': same(L.creatinineUmolL), 'mg/dL': { limit: L.creatinineMgDl, toCanonical: creatinineMgDlToUmolL } },
  },
  // B12 is accepted in ng/L (= pg/mL) only: the clinical reference gives no pmol/L factor.
  b12: { label: 'Vitamin B12', canonicalUnit: 'ng/L', units: { 'ng/L': same(B12_NG_L), 'pg/mL': same({ ...B12_NG_L, unit: 'pg/mL' }) } },
  folate: {
    label: 'Folate',
    canonicalUnit: 'µg/L',
    units: {
      'µg/L': same(FOLATE_UG_L),
      'ng/mL': same({ ...FOLATE_UG_L, unit: 'ng/mL' }),
      'nmol/L': scaled(FOLATE_UG_L, 'nmol/L', FOLATE_UG_L_PER_NMOL_L),
    },
  },
  phosphate: {
    label: 'Phosphate',
    canonicalUnit: 'mmol/L',
    units: { 'mmol/L': same(PHOSPHATE_MMOL_L), 'mg/dL': scaled(PHOSPHATE_MMOL_L, 'mg/dL', PHOSPHATE_MMOL_L_PER_MG_DL) },
  },
}

export const DERIVED_UNITS = { tsat: '%', egfr: 'mL/min/1.73 m²' } as const

// Each accepted unit by its folded spelling, the first analyte's first in table order, built on first
// use: walking every analyte's units for every call folded each of them again for each row of an import.
let unitByKey: Map<string, string> | null = null

/** Lab systems spell units many ways (umol/l, μmol/L with a Greek mu, G/DL); one spelling is stored. */
export function normaliseUnit(unit: string): string {
  if (!unitByKey) {
    unitByKey = new Map()
    for (const def of Object.values(ANALYTE_DEFS))
      for (const u of Object.keys(def.units)) {
        const folded = u.replace('µ', 'u').toLowerCase()
        if (!unitByKey.has(folded)) unitByKey.set(folded, u)
      }
  }
  return unitByKey.get(unit.trim().replace(/[µμ]/g, 'u').toLowerCase()) ?? unit.trim()
}

export function unitsFor(analyte: Analyte): string[] {
  return Object.keys(ANALYTE_DEFS[analyte].units)
}

export function unitRule(analyte: Analyte, unit: string): UnitRule | undefined {
  return ANALYTE_DEFS[analyte].units[unit]
}

/**
 * Why a value is implausible in its unit, or null when it is plausible. The message names the
 * accepted range and, when the number would fit another unit the lab uses, suggests that unit
 * (Hb 12.5 "g/L" is almost certainly g/dL).
 */
export function implausibleValue(analyte: Analyte, unit: string, value: number): string | null {
  const rule = unitRule(analyte, unit)
  if (!rule) return null
  const { min, max } = rule.limit
  if (value >= min && value <= max) return null
  const other = unitsFor(analyte).find((u) => {
    const l = ANALYTE_DEFS[analyte].units[u]!.limit
    return u !== unit && value >= l.min && value <= l.max
  })
  const round = (n: number) => Number(n.toPrecision(4))
  let hint = other ? `; it looks like ${other}` : ''
  if (analyte === 'tsat' && value > 0 && value < 1) hint = `; it looks like a fraction: enter it as a percentage (${round(value * 100)} %)`
  return `${ANALYTE_DEFS[analyte].label} in ${unit} must be between ${round(min)} and ${round(max)} ${unit} (got ${value})${hint}`
}

/** Canonical value, rounded to remove floating-point noise from the conversion factors. */
export function toCanonical(analyte: Analyte, unit: string, value: number): number {
  const rule = unitRule(analyte, unit)
  if (!rule) throw new Error(`No unit rule for ${analyte} in ${unit}`)
  return Math.round(rule.toCanonical(value) * 1000) / 1000
}
