import type { Sequelize } from 'sequelize'
import { num, select, type ReportFilters } from './filters'

/**
 * The cancelled planned operations, for the measures whose events are not only operated episodes (an
 * operation that was cancelled may never have happened). The operated episodes' share of those two
 * measures (the cancellation measure's denominator, the blood order against the schedule) is counted
 * with the other episode facts (quality.ts). Grouped by operation, surgeon and month like the main query,
 * so breakdowns and trend add up.
 */
export const EXTRA_MEASURE_IDS = ['cancelled-for-anaemia', 'crossmatch-against-schedule'] as const
export type ExtraMeasureId = (typeof EXTRA_MEASURE_IDS)[number]

const FILTERS = (f: ReportFilters) =>
  [...(f.surgeonId !== null ? ['r.surgeon_id = :surgeonId'] : []), ...(f.procedureCode !== null ? ['p.code = :procedureCode'] : [])]
    .map((s) => ` AND ${s}`)
    .join('')

// Events: a planned operation date that ended in a recorded cancellation (the cancelled date).
const SQL = (f: ReportFilters) => `
SELECT r.procedure_id AS procedureId, r.surgeon_id AS surgeonId, DATE_FORMAT(c.from_date, '%Y-%m') AS month,
  SUM(c.reason = 'anaemia') AS cn, COUNT(*) AS cd, 0 AS xn, 0 AS xd
FROM surgery_date_changes c JOIN referrals r ON r.id = c.referral_id JOIN procedures p ON p.id = r.procedure_id
WHERE c.kind = 'cancelled' AND c.from_date >= :from AND c.from_date <= :to${FILTERS(f)}
GROUP BY r.procedure_id, r.surgeon_id, DATE_FORMAT(c.from_date, '%Y-%m')`

export interface ExtraGroup {
  procedureId: number
  surgeonId: number
  month: string
  n: Record<ExtraMeasureId, number>
  d: Record<ExtraMeasureId, number>
}

export async function qualityExtras(sequelize: Sequelize, f: ReportFilters): Promise<ExtraGroup[]> {
  const rows = await select<Record<string, unknown>>(sequelize, SQL(f), {
    from: f.from,
    to: f.to,
    surgeonId: f.surgeonId,
    procedureCode: f.procedureCode,
  })
  return rows.map((g) => ({
    procedureId: num(g.procedureId)!,
    surgeonId: num(g.surgeonId)!,
    month: String(g.month),
    n: { 'cancelled-for-anaemia': num(g.cn) ?? 0, 'crossmatch-against-schedule': num(g.xn) ?? 0 },
    d: { 'cancelled-for-anaemia': num(g.cd) ?? 0, 'crossmatch-against-schedule': num(g.xd) ?? 0 },
  }))
}

type Sums = { operated: number; rbcUnits: number; n: number[]; d: number[] }
type Group = { procedureId: number; surgeonId: number; month: string; sums: Sums }

/** Adds the extra counts into the main query's groups (a group only the extras know is added). */
export function mergeExtras(groups: Group[], extras: ExtraGroup[], ids: readonly string[], empty: () => Sums): void {
  for (const x of extras) {
    let g = groups.find((y) => y.procedureId === x.procedureId && y.surgeonId === x.surgeonId && y.month === x.month)
    if (!g) {
      g = { procedureId: x.procedureId, surgeonId: x.surgeonId, month: x.month, sums: empty() }
      groups.push(g)
    }
    for (const id of EXTRA_MEASURE_IDS) {
      const i = ids.indexOf(id)
      g.sums.n[i]! += x.n[id]
      g.sums.d[i]! += x.d[id]
    }
  }
}
