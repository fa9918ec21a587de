import { CLINICAL_LIMITS, convertHb, type HbUnit } from '../clinical'

/**
 * Where an Hb result comes from decides the unit it is most likely in. The defaults are local
 * policy: this hospital's laboratory reports g/L, bedside meters often show g/dL, and some
 * European laboratories report mmol/L. The person entering it still picks the unit.
 */
export const HB_SOURCES = [
  { key: 'hospital-lab', label: 'Hospital laboratory', defaultUnit: 'g/L' },
  { key: 'point-of-care', label: 'Point-of-care meter', defaultUnit: 'g/dL' },
  { key: 'outside-lab-mmol', label: 'Outside laboratory reporting mmol/L', defaultUnit: 'mmol/L' },
] as const satisfies readonly { key: string; label: string; defaultUnit: HbUnit }[]
export type HbSource = (typeof HB_SOURCES)[number]['key']

export function hbDefaultUnit(source: HbSource): HbUnit {
  return HB_SOURCES.find((s) => s.key === source)?.defaultUnit ?? 'g/L'
}

const round1 = (n: number) => Math.round(n * 10) / 10

/** The value in all three units, for the reader to check before saving. */
export function hbInAllUnits(value: number, unit: HbUnit): { gL: number; gDl: number; mmolL: number } {
  const gL = convertHb(value, unit, 'g/L')
  return { gL: round1(gL), gDl: round1(convertHb(gL, 'g/L', 'g/dL')), mmolL: round1(convertHb(gL, 'g/L', 'mmol/L')) }
}

const inside = (v: number, l: { min: number; max: number }) => v >= l.min && v <= l.max

/**
 * The same number is a plausible Hb in g/dL and in mmol/L from 2 to about 15.5 (8.0 is 80 g/L
 * or 129 g/L): such a value must be confirmed, never taken silently. Returns the sentence that
 * names both readings and the limits, or null when the value can only be one unit.
 */
export function hbUnitAmbiguity(value: number, unit: string): string | null {
  if (unit !== 'g/dL' && unit !== 'mmol/L') return null
  if (!inside(value, CLINICAL_LIMITS.hbGDl) || !inside(value, CLINICAL_LIMITS.hbMmolL)) return null
  const asGDl = round1(convertHb(value, 'g/dL', 'g/L'))
  const asMmol = round1(convertHb(value, 'mmol/L', 'g/L'))
  return (
    `Hb ${value} fits both g/dL (${CLINICAL_LIMITS.hbGDl.min}–${CLINICAL_LIMITS.hbGDl.max}) and mmol/L ` +
    `(${CLINICAL_LIMITS.hbMmolL.min.toFixed(1)}–${CLINICAL_LIMITS.hbMmolL.max.toFixed(1)}): it is ${asGDl} g/L as g/dL but ` +
    `${asMmol} g/L as mmol/L. Confirm the unit (${unit}) before saving`
  )
}
