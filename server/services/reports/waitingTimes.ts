import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS, type Report } from '../../../shared/reports'
import { num, round1, select, whereFor, type ReportFilters } from './filters'
import { MILESTONE_JOIN } from './milestones'
import { groupedPercentile } from './percentile'

const LEGS = [
  ['referralToScreening', 'Referral → first screening result', 'created_at', 'first_hb_at'],
  ['screeningToClinic', 'First screening result → clinic', 'first_hb_at', 'clinic_at'],
  ['clinicToTreatment', 'Clinic → first treatment', 'clinic_at', 'first_dose_at'],
  ['treatmentToSurgery', 'First treatment → surgery', 'first_dose_at', 'surgery_date'],
  ['referralToSurgery', 'Referral → surgery', 'created_at', 'surgery_date'],
] as const

// How each end of a leg reads in its definition (a clinician reads these, not column names).
const END_WORDING = {
  created_at: 'the referral',
  first_hb_at: 'the first counted Hb',
  clinic_at: 'the first move to clinic',
  first_dose_at: 'the first iron dose given',
  surgery_date: 'the surgery date on the post-operative record',
} as const

// Each episode's legs are day counts (NULL where an end is missing) over its milestones
// (milestones.ts). MariaDB groups the episodes by their five legs (t), then counts episodes per
// leg and day (a few hundred rows); the median and 90th centile are read off those counts in
// groupedPercentile. Issue #19: ten PERCENTILE_CONT window sorts over every episode cost about as
// much MariaDB CPU again as the milestones themselves.
// Where each end comes from (the surgery date is the post-operative record's, NULL without one).
const COLUMN = {
  created_at: 'r.created_at',
  first_hb_at: 'm.first_hb_at',
  clinic_at: 'm.clinic_at',
  first_dose_at: 'm.first_dose_at',
  surgery_date: 'm.surgery_date',
}
const LEG_DAYS = LEGS.map((_, i) => `WHEN ${i} THEN t.l${i}`).join(' ')
const SQL = (where: string) => `
WITH t AS (
  SELECT ${LEGS.map(([, , a, b], i) => `DATEDIFF(${COLUMN[b]}, ${COLUMN[a]}) AS l${i}`).join(', ')}, COUNT(*) AS n
  FROM referrals r${MILESTONE_JOIN}
  WHERE ${where}
  GROUP BY ${LEGS.map((_, i) => `l${i}`).join(', ')}
)
SELECT k.leg, CASE k.leg ${LEG_DAYS} END AS days, SUM(t.n) AS n
FROM t JOIN (${LEGS.map((_, i) => `SELECT ${i} AS leg`).join(' UNION ALL ')}) k
GROUP BY k.leg, days HAVING days IS NOT NULL`

export async function waitingTimesReport(sequelize: Sequelize, f: ReportFilters): Promise<Report> {
  const w = whereFor(f, 'referral')
  const counts = LEGS.map(() => [] as { value: number; n: number }[])
  for (const g of await select<{ leg: unknown; days: unknown; n: unknown }>(sequelize, SQL(w.sql), w.replacements))
    counts[num(g.leg)!]!.push({ value: num(g.days)!, n: num(g.n) ?? 0 })
  const period = `${PERIOD_BASIS.referral} (${f.from} to ${f.to})`
  const definitions = Object.fromEntries(
    LEGS.map(([key, label, a, b]) => [
      key,
      {
        numerator:
          `Calendar days from ${END_WORDING[a]} to ${END_WORDING[b]} (${label}); median and 90th centile (linear ` + `interpolation)`,
        denominator:
          'Episodes where both dates exist (clinic = first move to clinic; treatment = first iron dose given; surgery = actual ' +
          'surgery date)',
        period,
      },
    ]),
  )
  const rows = LEGS.map(([key, label], i) => {
    const days = counts[i]!
    return {
      leg: key,
      label,
      episodes: days.reduce((s, g) => s + g.n, 0),
      medianDays: round1(groupedPercentile(days, 0.5)),
      p90Days: round1(groupedPercentile(days, 0.9)),
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
