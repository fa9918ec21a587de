import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS } from '../../../shared/reports'
import {
  FIGURES,
  MEASURES,
  QUALITY_MEASURE_IDS,
  TXA_EXPECTED_LOSS_ML,
  type MeasureFigure,
  type QualityBreakdownRow,
  type QualityMeasure,
  type QualityMeasureId,
  type QualityReport,
} from '../../../shared/reports/quality'
import { classifyAnaemia } from '../../../shared/clinical'
import { getClinicSettings } from '../clinicSettings'
import { num, pct, round1, select, whereFor, FACTS_ONCE, type ReportFilters } from './filters'
import { groupedMedian } from './haemoglobin'
import { QUALITY_FACTS_SQL, PRE_HB_SQL } from './qualitySql'
import { mergeExtras, qualityExtras } from './qualityExtras'

// The Hb facts are bits of x.hbFlags (HB_FLAGS in qualitySql.ts, from the pre-aggregate's values); anaemia is judged
// there as screening judges it (clinic criteria, strict "<"), as in the transfusion report.
const HB = (bit: number) => `(x.hbFlags & ${bit}) > 0`
const IDA = `(${HB(1)} AND x.ironDeficient)`

/** Each measure's numerator and denominator as sums over the episode facts. */
const COUNTS: Record<QualityMeasureId, [string, string]> = {
  'iron-before-surgery': [`${IDA} AND x.ironBefore`, IDA],
  'post-operative-iron': [`${IDA} AND COALESCE(x.postOpIron, 0) = 1`, IDA],
  'tranexamic-acid': ['x.moderateLoss AND COALESCE(x.txaGiven, 0) = 1', 'x.moderateLoss'],
  'reassessed-after-each-unit': ['x.rbcReassessed', 'x.rbcRows'],
  'transfusion-information': [
    'x.anyTransfusions > 0 AND (COALESCE(x.infoOnRecord, 0) = 1 OR x.infoOnTransfusion = 1)',
    'x.anyTransfusions > 0',
  ],
  'screened-28-days-before': [HB(8), '1'],
  'screened-in-window-14-45': [HB(16), '1'],
  'anaemic-on-day-of-surgery': [HB(4), HB(2)],
  transfused: ['x.rbcUnits > 0', '1'],
  'single-unit-red-cell-transfusions': ['x.rbcSingle', 'x.rbcRows'],
  'postponed-for-anaemia': ['x.postponementsForAnaemia > 0', '1'],
  // Every operated episode is a planned operation that went ahead; the cancelled ones are counted by their own
  // query (qualityExtras.ts) and added to the groups below.
  'cancelled-for-anaemia': ['0', '1'],
  // Positive red-cell antibodies need a crossmatch whatever the schedule says: those episodes leave the denominator.
  'crossmatch-against-schedule': ['x.groupAndScreenOnly AND x.crossmatched', 'x.groupAndScreenOnly'],
}

const SQL = (where: string, sameThresholdForBoth: boolean) => `${FACTS_ONCE}
SELECT x.procedureId, x.surgeonId, x.month, COUNT(*) AS operated, SUM(x.rbcUnits) AS rbcUnits,
  ${QUALITY_MEASURE_IDS.map((id, i) => `SUM(${COUNTS[id][0]}) AS n${i}, SUM(${COUNTS[id][1]}) AS d${i}`).join(',\n  ')}
FROM (${QUALITY_FACTS_SQL(where, sameThresholdForBoth)}) x
GROUP BY x.procedureId, x.surgeonId, x.month`

const NAMES_SQL = `SELECT 'p' AS kind, id, code AS groupKey, name FROM procedures WHERE id IN (:procedureIds)
  UNION ALL SELECT 'u', id, CAST(id AS CHAR), name FROM users WHERE id IN (:surgeonIds)`

type Sums = { operated: number; rbcUnits: number; n: number[]; d: number[] }
const empty = (): Sums => ({ operated: 0, rbcUnits: 0, n: QUALITY_MEASURE_IDS.map(() => 0), d: QUALITY_MEASURE_IDS.map(() => 0) })
function add(into: Sums, g: Sums): void {
  into.operated += g.operated
  into.rbcUnits += g.rbcUnits
  g.n.forEach((v, i) => {
    into.n[i]! += v
  })
  g.d.forEach((v, i) => {
    into.d[i]! += v
  })
}
/**
 * The main statement returns one row per procedure, surgeon and month (its GROUP BY). Issue #19: it was once
 * split by referral id into statements on two pool connections, which paid while it ran correlated lookups;
 * since it reads the episode_facts pre-aggregate, one statement is faster (server CPU per report 107 → 74 ms,
 * wall median 167 → 124 ms, measured interleaved on the bench database), so the split was taken out.
 */
function toGroups(rows: Record<string, unknown>[]): { procedureId: number; surgeonId: number; month: string; sums: Sums }[] {
  return rows.map((g) => ({
    procedureId: num(g.procedureId)!,
    surgeonId: num(g.surgeonId)!,
    month: String(g.month),
    sums: {
      operated: num(g.operated) ?? 0,
      rbcUnits: num(g.rbcUnits) ?? 0,
      n: QUALITY_MEASURE_IDS.map((_, i) => num(g[`n${i}`]) ?? 0),
      d: QUALITY_MEASURE_IDS.map((_, i) => num(g[`d${i}`]) ?? 0),
    },
  }))
}
const figures = (s: Sums) =>
  Object.fromEntries(
    QUALITY_MEASURE_IDS.map((id, i) => [id, { numerator: s.n[i]!, denominator: s.d[i]!, percent: pct(s.n[i]!, s.d[i]!) }]),
  ) as Record<QualityMeasureId, MeasureFigure>

export async function qualityReport(sequelize: Sequelize, f: ReportFilters): Promise<QualityReport> {
  const settings = await getClinicSettings()
  const threshold = (sex: 'male' | 'female') => classifyAnaemia({ hbGL: 100, sex, criteria: settings.anaemiaCriteria }).thresholdGL
  const w = whereFor(f, 'surgery')
  const [maleGL, femaleGL] = [threshold('male'), threshold('female')]
  const sameForBoth = maleGL === femaleGL
  const replacements = { ...w.replacements, maleGL, femaleGL, txaLossMl: TXA_EXPECTED_LOSS_ML }
  const [main, preHb, extras] = await Promise.all([
    select<Record<string, unknown>>(sequelize, SQL(w.sql, sameForBoth), replacements),
    select<{ value: unknown; n: unknown }>(sequelize, PRE_HB_SQL(w.sql), w.replacements),
    qualityExtras(sequelize, f),
  ])
  const groups = toGroups(main)
  mergeExtras(groups, extras, QUALITY_MEASURE_IDS, empty)
  const total = empty()
  for (const g of groups) add(total, g.sums)

  const period = `${PERIOD_BASIS.surgery} (${f.from} to ${f.to})`
  const all = figures(total)
  const measures: QualityMeasure[] = QUALITY_MEASURE_IDS.map((id) => {
    const m = MEASURES[id]
    return {
      id,
      title: m.title,
      ...all[id],
      value: null,
      unit: null,
      definition: { numerator: m.numerator, denominator: m.denominator, period },
      source: m.source,
      ...(m.benchmark ? { benchmark: m.benchmark } : {}),
    }
  })
  const hbGroups = preHb.map((g) => ({ value: num(g.value)!, n: num(g.n) ?? 0 }))
  const hbCount = hbGroups.reduce((s, g) => s + g.n, 0)
  const figureOf = (id: keyof typeof FIGURES, numerator: number, denominator: number, value: number | null): QualityMeasure => ({
    id,
    title: FIGURES[id].title,
    numerator,
    denominator,
    percent: null,
    value,
    unit: FIGURES[id].unit,
    definition: { numerator: FIGURES[id].numerator, denominator: FIGURES[id].denominator, period },
    source: FIGURES[id].source,
  })
  measures.push(figureOf('median-pre-transfusion-hb', hbCount, hbCount, round1(groupedMedian(hbGroups))))
  measures.push(
    figureOf(
      'units-per-100-operated',
      total.rbcUnits,
      total.operated,
      total.operated > 0 ? round1((100 * total.rbcUnits) / total.operated) : null,
    ),
  )

  const names =
    groups.length === 0
      ? []
      : await select<{ kind: string; id: number; groupKey: string; name: string }>(sequelize, NAMES_SQL, {
          procedureIds: [...new Set(groups.map((g) => g.procedureId))],
          surgeonIds: [...new Set(groups.map((g) => g.surgeonId))],
        })
  const breakdown = (kind: 'p' | 'u', idOf: (g: (typeof groups)[number]) => number): QualityBreakdownRow[] => {
    const sums = new Map<number, Sums>()
    for (const g of groups) {
      const s = sums.get(idOf(g)) ?? empty()
      add(s, g.sums)
      sums.set(idOf(g), s)
    }
    return [...sums.entries()]
      .map(([id, s]) => {
        const n = names.find((x) => x.kind === kind && Number(x.id) === id)
        return { key: n?.groupKey ?? String(id), name: n?.name ?? '', measures: figures(s) }
      })
      .sort((a, b) => a.key.localeCompare(b.key))
  }
  const months = new Map<string, Sums>()
  for (const g of groups) {
    const s = months.get(g.month) ?? empty()
    add(s, g.sums)
    months.set(g.month, s)
  }

  return {
    period: { from: f.from, to: f.to, basis: PERIOD_BASIS.surgery },
    filters: { surgeonId: f.surgeonId, procedureCode: f.procedureCode },
    measures,
    byOperation: breakdown('p', (g) => g.procedureId),
    bySurgeon: breakdown('u', (g) => g.surgeonId),
    trend: [...months.entries()].sort((a, b) => a[0].localeCompare(b[0])).map(([month, s]) => ({ month, measures: figures(s) })),
    caution:
      'Figures count what was recorded in Ferrolane; a measure is only as complete as its records. Benchmarks are national ' +
      'audit figures for comparison, not targets set by the audit.',
  }
}
