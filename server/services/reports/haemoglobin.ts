import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS, type Report } from '../../../shared/reports'
import { num, round1, select, whereFor, FACTS_ONCE, type ReportFilters } from './filters'
import { SURGERY_DAY_SQL } from './surgeryDay'

const BIN_GL = 10

// One pass: the per-episode lookups run once and are grouped by (product, screening band,
// surgery-day band, rise); the few hundred groups are then summed and the medians read off.
const SQL = (where: string) => `${FACTS_ONCE}
SELECT COALESCE(x.product, 'untreated') AS product,
  FLOOR(x.first_hb / ${BIN_GL}) * ${BIN_GL} AS firstBin, FLOOR(x.surgery_hb / ${BIN_GL}) * ${BIN_GL} AS surgeryBin,
  x.surgery_hb - x.first_hb AS rise, COUNT(*) AS n
FROM (${SURGERY_DAY_SQL(where)}) x
WHERE x.first_hb IS NOT NULL OR x.surgery_hb IS NOT NULL
GROUP BY product, firstBin, surgeryBin, rise`

/** Median of grouped values, interpolating between the two middle ones as PERCENTILE_CONT does. */
export function groupedMedian(groups: { value: number; n: number }[]): number | null {
  const sorted = [...groups].sort((a, b) => a.value - b.value)
  const total = sorted.reduce((s, g) => s + g.n, 0)
  if (total === 0) return null
  const at = (rank: number) => {
    let seen = 0
    for (const g of sorted) {
      seen += g.n
      if (rank < seen) return g.value
    }
    return sorted[sorted.length - 1]!.value
  }
  const mid = (total - 1) / 2
  return (at(Math.floor(mid)) + at(Math.ceil(mid))) / 2
}

export async function haemoglobinReport(sequelize: Sequelize, f: ReportFilters): Promise<Report> {
  const w = whereFor(f, 'surgery')
  const groups = (await select<Record<string, unknown>>(sequelize, SQL(w.sql), w.replacements)).map((g) => ({
    product: String(g.product),
    firstBin: num(g.firstBin),
    surgeryBin: num(g.surgeryBin),
    rise: num(g.rise),
    n: num(g.n) ?? 0,
  }))
  const bins = new Map<number, { screening: number; surgeryDay: number }>()
  const bin = (b: number) => bins.get(b) ?? (bins.set(b, { screening: 0, surgeryDay: 0 }), bins.get(b)!)
  const rises = new Map<string, { value: number; n: number }[]>()
  for (const g of groups) {
    if (g.firstBin !== null) bin(g.firstBin).screening += g.n
    if (g.surgeryBin !== null) bin(g.surgeryBin).surgeryDay += g.n
    if (g.rise !== null) rises.set(g.product, [...(rises.get(g.product) ?? []), { value: g.rise, n: g.n }])
  }
  const period = `${PERIOD_BASIS.surgery} (${f.from} to ${f.to})`
  const screening = "screening Hb = the episode's first Hb result"
  const surgeryDay = 'surgery-day Hb = the last Hb taken on or before the actual surgery date'
  return {
    report: 'haemoglobin',
    period: { from: f.from, to: f.to, basis: PERIOD_BASIS.surgery },
    filters: { surgeonId: f.surgeonId, procedureCode: f.procedureCode },
    tables: {
      distribution: {
        columns: [
          { key: 'binFromGL', label: 'From (g/L)' },
          { key: 'binToGL', label: 'Below (g/L)' },
          { key: 'screening', label: 'At screening' },
          { key: 'surgeryDay', label: 'On the surgery day' },
        ],
        rows: [...bins.entries()].sort((a, b) => a[0] - b[0]).map(([from, c]) => ({ binFromGL: from, binToGL: from + BIN_GL, ...c })),
        definitions: {
          screening: {
            numerator: `Episodes whose ${screening} is in the ${BIN_GL} g/L band`,
            denominator: 'Episodes with a screening Hb (counts, not shares)',
            period,
          },
          surgeryDay: {
            numerator: `Episodes whose ${surgeryDay} is in the band`,
            denominator: 'Episodes with a surgery-day Hb (counts, not shares)',
            period,
          },
        },
      },
      riseByProduct: {
        columns: [
          { key: 'productCode', label: 'Product' },
          { key: 'patients', label: 'Episodes' },
          { key: 'medianRiseGL', label: 'Median rise (g/L)' },
        ],
        rows: [...rises.entries()]
          .sort((a, b) => a[0].localeCompare(b[0]))
          .map(([productCode, g]) => ({
            productCode,
            patients: g.reduce((s, x) => s + x.n, 0),
            medianRiseGL: round1(groupedMedian(g)),
          })),
        definitions: {
          medianRiseGL: {
            numerator:
              `Median of (${surgeryDay}) − (${screening}), grouped by the product of the first iron dose given before surgery ` +
              `('untreated' when none)`,
            denominator: 'Episodes with both Hb values',
            period,
          },
        },
      },
    },
  }
}
