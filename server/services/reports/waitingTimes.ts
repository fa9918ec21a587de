import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS, type Report } from '../../../shared/reports'
import { num, round1, select, whereFor, type ReportFilters } from './filters'
import { MILESTONE_JOINS, WHOLE_PASSES } from './milestones'

const LEGS = [
  ['referralToScreening', 'Referral → first screening result', 'created_at', 'first_hb_at'],
  ['screeningToClinic', 'First screening result → clinic', 'first_hb_at', 'clinic_at'],
  ['clinicToTreatment', 'Clinic → first treatment', 'clinic_at', 'first_dose_at'],
  ['treatmentToSurgery', 'First treatment → surgery', 'first_dose_at', 'surgery_date'],
  ['referralToSurgery', 'Referral → surgery', 'created_at', 'surgery_date'],
] as const

// One pass over the episodes: each leg is a column of day counts (NULL where an end is missing),
// and MariaDB's PERCENTILE_CONT and COUNT skip the NULLs, so no leg is evaluated twice.
// The milestones come from grouped passes (milestones.ts), not a probe per referral.
const SQL = (where: string) => `${WHOLE_PASSES}
WITH x AS (
  SELECT r.created_at, fh.first_hb_at, st.clinic_at, fd.first_dose_at, o.surgery_date
  FROM referrals r JOIN procedures p ON p.id = r.procedure_id LEFT JOIN outcomes o ON o.referral_id = r.id${MILESTONE_JOINS}
  WHERE ${where}
), d AS (
  SELECT ${LEGS.map(([key, , a, b]) => `DATEDIFF(${b}, ${a}) AS ${key}`).join(', ')} FROM x
)
SELECT ${LEGS.map(
  ([key]) => `COUNT(${key}) OVER () AS ${key}_n,
  PERCENTILE_CONT(0.5) WITHIN GROUP (ORDER BY ${key}) OVER () AS ${key}_median,
  PERCENTILE_CONT(0.9) WITHIN GROUP (ORDER BY ${key}) OVER () AS ${key}_p90`,
).join(',\n  ')}
FROM d LIMIT 1`

export async function waitingTimesReport(sequelize: Sequelize, f: ReportFilters): Promise<Report> {
  const w = whereFor(f, 'referral')
  const [found] = await select<Record<string, unknown>>(sequelize, SQL(w.sql), w.replacements)
  const period = `${PERIOD_BASIS.referral} (${f.from} to ${f.to})`
  const definitions = Object.fromEntries(
    LEGS.map(([key, label, a, b]) => [
      key,
      {
        numerator:
          `Calendar days from ${a.replace(/_/g, ' ')} to ${b.replace(/_/g, ' ')} (${label}); median and 90th centile (linear ` +
          `interpolation)`,
        denominator:
          'Episodes where both dates exist (clinic = first move to clinic; treatment = first iron dose given; surgery = actual ' +
          'surgery date)',
        period,
      },
    ]),
  )
  const rows = LEGS.map(([key, label]) => {
    const n = num(found?.[`${key}_n`]) ?? 0
    return {
      leg: key,
      label,
      episodes: n,
      medianDays: n ? round1(num(found?.[`${key}_median`])) : null,
      p90Days: n ? round1(num(found?.[`${key}_p90`])) : null,
      definition: definitions[key]!,
    }
  })
  return {
    report: 'waiting-times',
    period: { from: f.from, to: f.to, basis: PERIOD_BASIS.referral },
    filters: { surgeonId: f.surgeonId, procedureCode: f.procedureCode },
    tables: {
      waitingTimes: {
        columns: [
          { key: 'leg', label: 'Leg' },
          { key: 'label', label: 'Label' },
          { key: 'episodes', label: 'Episodes' },
          { key: 'medianDays', label: 'Median (days)' },
          { key: 'p90Days', label: '90th centile (days)' },
        ],
        rows,
        definitions,
      },
    },
  }
}
