import { ANALYTE_DEFS, implausibleValue, normaliseUnit, toCanonical, unitsFor, type Analyte } from '../pathway/analytes'
import { LOINC } from '../fhir/loinc'
import { CLOCK_SKEW_MS } from '../schemas/fields'
import { analyteForCode } from './codes'
import { expectedDateForm, parseTakenAt } from './dates'
import type { ColumnMapping, MappedField } from './mapping'
import type { SkipCode } from './reasons'

/** A reading that passed every check that needs no database: ready to match to a patient. */
export interface Reading {
  mrn: string
  analyte: Analyte
  unit: string
  value: number
  valueCanonical: number
  /** Whole seconds, as results are stored and matched. */
  takenAt: Date
  /** For a value converted from another unit: how far a stored canonical value may differ and still be this reading. */
  tolerance?: number
}

export type Checked = { ok: true; reading: Reading } | { ok: false; code: SkipCode; reason: string }

const fail = (code: SkipCode, reason: string): Checked => ({ ok: false, code, reason })

// Earliest draw time accepted, as for typed-in results (shared/schemas/fields pastInstantField).
const EARLIEST = Date.parse('1990-01-01T00:00:00Z')

/** The unit a converted value came in, when the analyte table itself does not take it (TIBC in µg/dL). */
function exportUnit(analyte: Analyte, unit: string): ((v: number) => number) | undefined {
  const e = LOINC[analyte]
  return e.toCanonical && e.unit === unit ? e.toCanonical : undefined
}

/** Decimals the value was sent with: the precision at which two readings are the same reading. */
function decimals(value: number): number {
  const s = String(value)
  return s.includes('e') ? 6 : (s.split('.')[1] ?? '').length
}

/**
 * The same unit and plausibility rules a typed-in result meets (shared/pathway/analytes), so a
 * g/dL Hb sent as g/L is skipped with the same hint instead of stored as a catastrophic anaemia.
 * The units Ferrolane's own FHIR export writes (shared/fhir/loinc) are read back too.
 */
export function checkReading(input: { mrn: string; analyte: Analyte; unit: string; value: number; takenAt: Date }, now: number): Checked {
  const { analyte, value } = input
  const unit = normaliseUnit(input.unit)
  const def = ANALYTE_DEFS[analyte]
  const units = unitsFor(analyte)
  const fromExport = units.includes(unit) ? undefined : exportUnit(analyte, unit)
  if (!units.includes(unit) && !fromExport) {
    const accepted = [...units, ...(LOINC[analyte].toCanonical && !units.includes(LOINC[analyte].unit) ? [LOINC[analyte].unit] : [])]
    return fail('unknown-unit', `unit for ${def.label} must be one of ${accepted.join(', ')} (got ${input.unit || 'nothing'})`)
  }
  // Three decimals, as toCanonical (shared/pathway/analytes) stores every converted value.
  const canonical = fromExport ? Math.round(fromExport(value) * 1000) / 1000 : undefined
  const why = fromExport ? implausibleValue(analyte, def.canonicalUnit, canonical!) : implausibleValue(analyte, unit, value)
  if (why)
    return fail(
      'implausible-value',
      fromExport ? `${value} ${unit} is ${Math.round(canonical! * 100) / 100} ${def.canonicalUnit}: ${why}` : why,
    )
  const t = input.takenAt.getTime()
  if (t > now + CLOCK_SKEW_MS) return fail('bad-date', 'time taken is in the future')
  if (t < EARLIEST) return fail('bad-date', 'time taken must be after 1990')
  const takenAt = new Date(Math.floor(t / 1000) * 1000)
  const valueCanonical = canonical ?? toCanonical(analyte, unit, value)
  // A converted value stands for every stored value that rounds to it in the sent unit
  // (an export rounds µmol/L to 2 decimals of µg/dL): duplicates are matched within that.
  const tolerance = unit !== def.canonicalUnit && value !== 0 ? Math.abs(valueCanonical / value) * 0.5 * 10 ** -decimals(value) + 0.0005 : 0
  return { ok: true, reading: { mrn: input.mrn, analyte, unit, value, valueCanonical, takenAt, ...(tolerance ? { tolerance } : {}) } }
}

const NUMBER = /^[-+]?\d+(?:[.,]\d+)?$/

/** One CSV record (header → text) through the source's mapping. */
export function checkCsvRecord(record: Record<string, string | undefined>, mapping: ColumnMapping, timeZone: string, now: number): Checked {
  const cell = (f: keyof ColumnMapping['columns']) => record[mapping.columns[f]] ?? ''
  return checkCsvCells(cell('mrn'), cell('code'), cell('value'), cell('unit'), cell('takenAt'), mapping, timeZone, now)
}

/**
 * Where each mapped column is in a header's fields: the last column of that name, as a record
 * built from the header keeps it (a repeated name's last field wins); -1 for a column not there.
 */
export function mappedColumnIndexes(header: readonly string[], mapping: ColumnMapping): Record<MappedField, number> {
  const at = (f: MappedField) => header.lastIndexOf(mapping.columns[f])
  return { mrn: at('mrn'), code: at('code'), value: at('value'), unit: at('unit'), takenAt: at('takenAt') }
}

/**
 * checkCsvRecord for a record as csv-parse's array of fields, read through mappedColumnIndexes: the same
 * rule without building an object per row (an import checks 100 000 of them; README, performance notes).
 */
export function checkCsvFields(
  fields: readonly string[],
  at: Readonly<Record<MappedField, number>>,
  mapping: ColumnMapping,
  timeZone: string,
  now: number,
): Checked {
  const cell = (i: number) => (i < 0 ? '' : (fields[i] ?? ''))
  return checkCsvCells(cell(at.mrn), cell(at.code), cell(at.value), cell(at.unit), cell(at.takenAt), mapping, timeZone, now)
}

function checkCsvCells(
  mrnText: string,
  codeText: string,
  valueText: string,
  unitText: string,
  takenText: string,
  mapping: ColumnMapping,
  timeZone: string,
  now: number,
): Checked {
  const mrn = mrnText.trim()
  if (!mrn) return fail('unknown-mrn', `MRN is empty (column "${mapping.columns.mrn}")`)
  const code = codeText.trim()
  const analyte = analyteForCode(code, mapping.codes)
  if (!analyte) return fail('unknown-analyte', `test code "${code}" is not one Ferrolane imports (column "${mapping.columns.code}")`)
  const raw = valueText.trim()
  if (!NUMBER.test(raw)) {
    const censored = /^[<>]/.test(raw) ? ' (values reported as below or above a limit are not imported)' : ''
    return fail('implausible-value', `value "${raw}" is not a number${censored}`)
  }
  const taken = takenText.trim()
  const takenAt = parseTakenAt(taken, mapping.dateOrder, timeZone)
  if (!takenAt) return fail('bad-date', `time taken "${taken}" is not ${expectedDateForm(mapping.dateOrder)}`)
  return checkReading({ mrn, analyte, unit: unitText.trim(), value: Number(raw.replace(',', '.')), takenAt }, now)
}

/** The natural key of a stored result (referral, analyte, time taken, canonical value). */
export function naturalKey(referralId: number, analyte: string, takenAt: Date, valueCanonical: number): string {
  return `${referralId}|${analyte}|${Math.floor(takenAt.getTime() / 1000)}|${valueCanonical}`
}
