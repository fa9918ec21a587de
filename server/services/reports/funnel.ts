import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS, type Report } from '../../../shared/reports'
import { num, pct, select, whereFor, type ReportFilters } from './filters'
import { finalSql } from '../../models/result'

// Voided and preliminary Hb values do not count in any figure.
const COUNTED = finalSql('h')

// Each step is one indexed lookup per referral in the period; all counted in one pass.
const SQL = (where: string) => `
SELECT COUNT(*) AS referred,
  SUM(x.first_hb_at IS NOT NULL) AS screened,
  SUM(x.anaemic_or_deficient) AS anaemicOrDeficient,
  SUM(x.first_dose_at IS NOT NULL) AS treated,
  SUM(x.first_dose_at IS NOT NULL AND EXISTS (SELECT 1 FROM results h WHERE h.referral_id = x.id AND h.analyte = 'hb' AND
    ${COUNTED} AND h.taken_at > x.first_dose_at)) AS rechecked,
  SUM(x.cleared) AS cleared,
  SUM(x.operated) AS operated,
  SUM(x.operated AND x.first_hb_at IS NOT NULL AND DATEDIFF(x.surgery_date, x.first_hb_at) >= 28) AS screenedEarly
FROM (
  SELECT r.id,
    (SELECT MIN(h.taken_at) FROM results h WHERE h.referral_id = r.id AND h.analyte = 'hb' AND ${COUNTED}) AS first_hb_at,
    (SELECT MIN(a.given_at) FROM administrations a WHERE a.referral_id = r.id) AS first_dose_at,
    (r.anaemic = 1 OR r.iron_status IN ('absolute-deficiency', 'iron-restricted')
      OR EXISTS (SELECT 1 FROM prescriptions rx WHERE rx.referral_id = r.id)) AS anaemic_or_deficient,
    EXISTS (SELECT 1 FROM stage_transitions st WHERE st.referral_id = r.id AND st.to_stage = 'cleared') AS cleared,
    (o.id IS NOT NULL OR EXISTS (SELECT 1 FROM stage_transitions st WHERE st.referral_id = r.id AND st.to_stage = 'operated')) AS operated,
    COALESCE(o.surgery_date, r.planned_surgery_date) AS surgery_date
  FROM referrals r JOIN procedures p ON p.id = r.procedure_id LEFT JOIN outcomes o ON o.referral_id = r.id
  WHERE ${where}
) x`

const STEPS = [
  ['referred', 'Referred', 'Episodes referred'],
  ['screened', 'Screened', 'Episodes with at least one Hb result'],
  ['anaemicOrDeficient', 'Anaemic or iron deficient', 'Episodes classified anaemic or iron deficient at their latest screening, or prescribed iron'],
  ['treated', 'Treated', 'Episodes with at least one iron dose recorded as given'],
  ['rechecked', 'Re-checked', 'Treated episodes with an Hb taken after the first dose'],
  ['cleared', 'Cleared', 'Episodes ever moved to "Fit for theatre"'],
  ['operated', 'Operated', 'Episodes with a post-operative record or ever moved to "Surgery done"'],
  ['screenedEarly', 'Screened ≥ 28 days before surgery', 'Operated episodes whose first Hb was taken at least 28 days before the surgery date (actual where recorded, else planned)'],
] as const

export async function funnelReport(sequelize: Sequelize, f: ReportFilters): Promise<Report> {
  const w = whereFor(f, 'referral')
  const [row] = await select<Record<string, unknown>>(sequelize, SQL(w.sql), w.replacements)
  const counts = Object.fromEntries(STEPS.map(([k]) => [k, num(row?.[k]) ?? 0])) as Record<(typeof STEPS)[number][0], number>
  const period = `${PERIOD_BASIS.referral} (${f.from} to ${f.to})`
  const definitions = Object.fromEntries(STEPS.map(([key, , numerator]) => [key, {
    numerator, denominator: key === 'screenedEarly' ? 'Operated episodes' : 'Episodes referred', period,
  }]))
  // Each row is one figure, so it carries its own definition too (the CSV keeps the columns only).
  const rows = STEPS.map(([key, label]) => {
    const base = key === 'screenedEarly' ? counts.operated : counts.referred
    return { step: key, label, count: counts[key], percent: pct(counts[key], base), definition: definitions[key]! }
  })
  return {
    report: 'funnel', period: { from: f.from, to: f.to, basis: PERIOD_BASIS.referral }, filters: { surgeonId: f.surgeonId, procedureCode: f.procedureCode },
    tables: { funnel: { columns: [{ key: 'step', label: 'Step' }, { key: 'label', label: 'Label' }, { key: 'count', label: 'Episodes' }, { key: 'percent', label: '% of denominator' }], rows, definitions } },
  }
}
