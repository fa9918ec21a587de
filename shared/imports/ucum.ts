/**
 * UCUM unit codes (case-sensitive, as FHIR carries them in valueQuantity.code with system
 * http://unitsofmeasure.org) → the unit spellings Ferrolane accepts for results. UCUM writes
 * micro as "u" and litre as "L"; the codes below are UCUM's own (The Unified Code for Units of
 * Measure, Regenstrief; checked from memory). Which unit suits which analyte is still decided
 * by the analyte table, so an Hb in mg/L is refused there, not here.
 */
export { UCUM_SYSTEM } from '../fhir/loinc'

export const UCUM_TO_APP_UNIT: Readonly<Record<string, string>> = {
  'g/L': 'g/L',
  'g/dL': 'g/dL',
  'mmol/L': 'mmol/L',
  fL: 'fL',
  'ug/L': 'µg/L',
  'ng/mL': 'ng/mL',
  '%': '%',
  'umol/L': 'µmol/L',
  'ug/dL': 'µg/dL',
  'mg/L': 'mg/L',
  'mg/dL': 'mg/dL',
  'ng/L': 'ng/L',
  'pg/mL': 'pg/mL',
  'nmol/L': 'nmol/L',
}

export function appUnitForUcum(code: string): string | undefined {
  return Object.prototype.hasOwnProperty.call(UCUM_TO_APP_UNIT, code) ? UCUM_TO_APP_UNIT[code] : undefined
}
