import type { IronProduct } from '../shared/clinical'

/**
 * Generic iron products with the caps the clinical reference summarises. Every entry must be
 * checked against the local formulary and the product's current prescribing information.
 */
export const STARTER_FORMULARY: (IronProduct & { source: string })[] = [
  {
    code: 'ferric-carboxymaltose', name: 'Ferric carboxymaltose (IV)', route: 'iv',
    maxSingleDoseMg: 1000, maxSingleDoseMgPerKg: 20, minIntervalDays: 7, maxWeeklyMg: 1000, roundToMg: 100,
    source: 'EU SmPC as summarised in the clinical reference (≤1000 mg a dose, ≤20 mg/kg by infusion, ≤1000 mg a week). Check against your local formulary and the prescribing information.',
  },
  {
    code: 'ferric-derisomaltose', name: 'Ferric derisomaltose (IV)', route: 'iv',
    maxSingleDoseMg: 2000, maxSingleDoseMgPerKg: 20, minIntervalDays: 7, roundToMg: 100,
    source: 'Monograph: single infusion ≤20 mg/kg; the 2000 mg ceiling and 7-day interval are set locally. Check against your local formulary and the prescribing information.',
  },
  {
    code: 'iron-sucrose', name: 'Iron sucrose (IV)', route: 'iv',
    maxSingleDoseMg: 200, minIntervalDays: 2, maxWeeklyMg: 600, roundToMg: 100,
    source: 'Label: 100–200 mg, 1–3 times a week, 200 mg maximum a dose. Check against your local formulary and the prescribing information.',
  },
  {
    code: 'ferrous-sulfate-oral', name: 'Ferrous sulfate 200 mg tablet (65 mg elemental iron), oral', route: 'oral',
    maxSingleDoseMg: 65, minIntervalDays: 2, oralDailyMg: 65, oralAlternateDays: true,
    source: 'Alternate-day dosing: Stoffel, Lancet Haematol 2017; BSG guideline, Gut 2021. Check against your local formulary and the prescribing information.',
  },
]
