import type { IronDosingTable, IronProduct } from '../shared/clinical'

/**
 * Ferinject (ferric carboxymaltose) SmPC section 4.2, Table 1 "Determination of the iron need"
 * (MHRA revision 2021): Hb <10 / 10–<14 / ≥14 g/dL against body weight <35 / 35–<70 / ≥70 kg.
 */
export const FCM_DOSING_TABLE: IronDosingTable = {
  weightBandsKg: [0, 35, 70],
  hbBandsGL: [0, 100, 140],
  needMg: [
    [500, 1500, 2000],
    [500, 1000, 1500],
    [500, 500, 500],
  ],
  source: 'Ferinject SmPC 4.2, Table 1 (MHRA 2021)',
}

/**
 * Generic iron products with the caps the clinical reference summarises. Every entry must be
 * checked against the local formulary and the product's current prescribing information.
 */
export const STARTER_FORMULARY: (IronProduct & { source: string })[] = [
  {
    code: 'ferric-carboxymaltose',
    name: 'Ferric carboxymaltose (IV)',
    route: 'iv',
    maxSingleDoseMg: 1000,
    maxSingleDoseMgPerKg: 20,
    minIntervalDays: 7,
    maxWeeklyMg: 1000,
    roundToMg: 100,
    dosingTable: FCM_DOSING_TABLE,
    phosphateCheckOnRepeat: true,
    licensedFromAgeYears: 1,
    paediatricMaxSingleDoseMgPerKg: 15,
    paediatricMaxSingleDoseMg: 750,
    source:
      'Ferinject SmPC 4.2 (≤1000 mg and ≤20 mg/kg a dose, ≤1000 mg a week, Table 1); children: Injectafer US label (15 mg/kg, ' +
      '≤750 mg a dose). Check against your local formulary.',
  },
  {
    code: 'ferric-derisomaltose',
    name: 'Ferric derisomaltose (IV)',
    route: 'iv',
    maxSingleDoseMg: 2000,
    maxSingleDoseMgPerKg: 20,
    minIntervalDays: 7,
    roundToMg: 100,
    source:
      'Monograph: single infusion ≤20 mg/kg; the 2000 mg ceiling and 7-day interval are set locally. Check against your local ' +
      'formulary and the prescribing information.',
  },
  {
    code: 'iron-sucrose',
    name: 'Iron sucrose (IV)',
    route: 'iv',
    maxSingleDoseMg: 200,
    minIntervalDays: 2,
    maxWeeklyMg: 600,
    roundToMg: 100,
    source:
      'Label: 100–200 mg, 1–3 times a week, 200 mg maximum a dose. Check against your local formulary and the prescribing information.',
  },
  {
    code: 'ferrous-sulfate-oral',
    name: 'Ferrous sulfate 200 mg tablet (65 mg elemental iron), oral',
    route: 'oral',
    maxSingleDoseMg: 65,
    minIntervalDays: 2,
    oralDailyMg: 65,
    oralAlternateDays: true,
    source:
      'Alternate-day dosing: Stoffel, Lancet Haematol 2017; BSG guideline, Gut 2021. Check against your local formulary and the ' +
      'prescribing information.',
  },
]

/** The starter formulary as rows of iron_products (absent caps are NULL: no such cap). */
export function starterFormularyRows() {
  return STARTER_FORMULARY.map((p) => ({
    code: p.code,
    name: p.name,
    route: p.route,
    maxSingleDoseMg: p.maxSingleDoseMg,
    maxSingleDoseMgPerKg: p.maxSingleDoseMgPerKg ?? null,
    minIntervalDays: p.minIntervalDays,
    maxWeeklyMg: p.maxWeeklyMg ?? null,
    maxTotalMg: p.maxTotalMg ?? null,
    roundToMg: p.roundToMg ?? null,
    oralDailyMg: p.oralDailyMg ?? null,
    oralAlternateDays: p.oralAlternateDays ?? null,
    source: p.source,
    licensedFromAgeYears: p.licensedFromAgeYears ?? null,
    paediatricMaxSingleDoseMgPerKg: p.paediatricMaxSingleDoseMgPerKg ?? null,
    paediatricMaxSingleDoseMg: p.paediatricMaxSingleDoseMg ?? null,
    dosingTable: p.dosingTable ?? null,
    dosedByTable: p.dosingTable !== undefined,
    phosphateCheckOnRepeat: p.phosphateCheckOnRepeat ?? false,
  }))
}
