/**
 * Accepted input ranges, as data, so the server's and client's validation schemas can reuse
 * exactly the limits the calculations enforce. Bounds are inclusive.
 *
 * The ranges are deliberately wider than normal physiology (so real extreme patients are not
 * refused) but narrow enough to catch unit mix-ups, e.g. Hb typed in g/dL into a g/L field
 * (12 instead of 120) or a saturation typed as a percentage.
 */
export interface Limit {
  readonly min: number
  readonly max: number
  readonly unit: string
}

export const CLINICAL_LIMITS = {
  hbGL: { min: 20, max: 250, unit: 'g/L' },
  hbGDl: { min: 2, max: 25, unit: 'g/dL' },
  // 20–250 g/L expressed per Fe monomer (g/dL × 0.6206).
  hbMmolL: { min: 1.2412, max: 15.515, unit: 'mmol/L' },
  weightKg: { min: 2, max: 350, unit: 'kg' },
  heightCm: { min: 40, max: 250, unit: 'cm' },
  saturation: { min: 0, max: 1, unit: '(fraction)' },
  po2MmHg: { min: 0, max: 700, unit: 'mmHg' },
  po2KPa: { min: 0, max: 93.33, unit: 'kPa' },
  p50MmHg: { min: 10, max: 60, unit: 'mmHg' },
  hillN: { min: 1, max: 5, unit: '(Hill coefficient)' },
  hufnerMlPerG: { min: 1, max: 1.4, unit: 'mL O2/g' },
  solubilityMlDlMmHg: { min: 0.002, max: 0.004, unit: 'mL O2/dL/mmHg' },
  cao2MlDl: { min: 0, max: 40, unit: 'mL O2/dL' },
  cardiacOutputLMin: { min: 1, max: 20, unit: 'L/min' },
  creatinineUmolL: { min: 10, max: 3000, unit: 'µmol/L' },
  creatinineMgDl: { min: 0.11, max: 34, unit: 'mg/dL' },
  ageYears: { min: 18, max: 120, unit: 'years' },
  ebvMl: { min: 100, max: 30000, unit: 'mL' },
  hct: { min: 0.05, max: 0.8, unit: '(fraction)' },
  bloodLossMl: { min: 0, max: 30000, unit: 'mL' },
  redCellLossMl: { min: 0, max: 25000, unit: 'mL' },
  unitRedCellMl: { min: 50, max: 400, unit: 'mL' },
  ferritinUgL: { min: 0, max: 100000, unit: 'µg/L' },
  tsatPct: { min: 0, max: 100, unit: '%' },
  crpMgL: { min: 0, max: 1000, unit: 'mg/L' },
  ironUmolL: { min: 0, max: 150, unit: 'µmol/L' },
  ironUgDl: { min: 0, max: 840, unit: 'µg/dL' },
  tibcUmolL: { min: 5, max: 200, unit: 'µmol/L' },
  transferrinGL: { min: 0.2, max: 8, unit: 'g/L' },
  ironStoresMg: { min: 0, max: 1500, unit: 'mg' },
  // Formulary entries (iron products), so an administrator cannot enter a cap of 0 or 1e6.
  productMaxSingleDoseMg: { min: 1, max: 5000, unit: 'mg' },
  productMaxSingleDoseMgPerKg: { min: 0.1, max: 100, unit: 'mg/kg' },
  productMinIntervalDays: { min: 0, max: 365, unit: 'days' },
  productMaxWeeklyMg: { min: 1, max: 10000, unit: 'mg' },
  productMaxTotalMg: { min: 1, max: 20000, unit: 'mg' },
  productRoundToMg: { min: 1, max: 1000, unit: 'mg' },
  productOralDailyMg: { min: 1, max: 1000, unit: 'mg elemental iron' },
  riseGLPerWeek: { min: 0, max: 20, unit: 'g/L per week' },
  maxRiseGL: { min: 0, max: 80, unit: 'g/L' },
  onsetDays: { min: 0, max: 60, unit: 'days' },
} as const satisfies Record<string, Limit>

export type ClinicalLimitName = keyof typeof CLINICAL_LIMITS
