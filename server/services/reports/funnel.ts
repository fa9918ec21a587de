import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS, type Report } from '../../../shared/reports'
import { num, pct, select, whereFor, type ReportFilters } from './filters'
import { MILESTONE_JOIN } from './milestones'

// One pass over the period's referrals with each one's milestones (milestones.ts). An episode has a
// post-operative record exactly when m.surgery_date is set (the record's surgery date is NOT NULL).
const SQL = (where: string) => `
SELECT COUNT(*) AS referred,
  SUM(m.first_hb_at IS NOT NULL) AS screened,
  SUM(r.anaemic = 1 OR r.iron_status IN ('absolute-deficiency', 'iron-restricted') OR COALESCE(m.prescribed, 0) = 1)
    AS anaemicOrDeficient,
  SUM(m.first_dose_at IS NOT NULL) AS treated,
  SUM(m.first_dose_at IS NOT NULL AND m.last_hb_at > m.first_dose_at) AS rechecked,
  SUM(COALESCE(m.cleared, 0)) AS cleared,
  SUM(m.surgery_date IS NOT NULL OR COALESCE(m.operated, 0)) AS operated,
  SUM((m.surgery_date IS NOT NULL OR COALESCE(m.operated, 0)) AND m.first_hb_at IS NOT NULL
    AND DATEDIFF(COALESCE(m.surgery_date, r.planned_surgery_date), m.first_hb_at) >= 28) AS screenedEarly
FROM referrals r${MILESTONE_JOIN}
WHERE ${where}`

const STEPS = [
  ['referred', 'Referred', 'Episodes referred'],
  ['screened', 'Screened', 'Episodes with at least one Hb result'],
  [
    'anaemicOrDeficient',
    'Anaemic or iron deficient',
    'Episodes classified anaemic or iron deficient at their latest screening, or prescribed iron',
  ],
  ['treated', 'Treated', 'Episodes with at least one iron dose recorded as given'],
  ['rechecked', 'Re-checked', 'Treated episodes with an Hb taken after the first dose'],
  ['cleared', 'Cleared', 'Episodes ever moved to "Fit for theatre"'],
  ['operated', 'Operated', 'Episodes with a post-operative record or ever moved to "Surgery done"'],
  [
    'screenedEarly',
    'Screened ≥ 28 days before surgery',
    'Operated episodes whose first Hb was taken at least 28 days before the surgery date (actual where recorded, else planned)',
  ],
] as const

export async function funnelReport(sequelize: Sequelize, f: ReportFilters): Promise<Report> {
  const w = whereFor(f, 'referral')
  const [row] = await select<Record<string, unknown>>(sequelize, SQL(w.sql), w.replacements)
  const counts = Object.fromEntries(STEPS.map(([k]) => [k, num(row?.[k]) ?? 0])) as Record<(typeof STEPS)[number][0], number>
  const period = `${PERIOD_BASIS.referral} (${f.from} to ${f.to})`
  const definitions = Object.fromEntries(
    STEPS.map(([key, , numerator]) => [
      key,
      {
        numerator,
        denominator: key === 'screenedEarly' ? 'Operated episodes' : 'Episodes referred',
        period,
      },
    ]),
  )
  // Each row is one figure, so it carries its own definition too (the CSV keeps the columns only).
  const rows = STEPS.map(([key, label]) => {
    const base = key === 'screenedEarly' ? counts.operated : counts.referred
    return { step: key, label, count: counts[key], percent: pct(counts[key], base), definition: definitions[key]! }
  })
  return {
    report: 'funnel',
    period: { from: f.from, to: f.to, basis: PERIOD_BASIS.referral },
    filters: { surgeonId: f.surgeonId, procedureCode: f.procedureCode },
    tables: {
      funnel: {
        columns: [
          { key: 'step', label: 'Step' },
          { key: 'label', label: 'Label' },
          { key: 'count', label: 'Episodes' },
          { key: 'percent', label: '% of denominator' },
        ],
        rows,
        definitions,
      },
    },
  }
}
