import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS, type Definition, type Report, type ReportTable } from '../../../shared/reports'
import { classifyAnaemia } from '../../../shared/clinical'
import { getClinicSettings } from '../clinicSettings'
import { num, pct, round1, select, whereFor, FACTS_ONCE, type ReportFilters } from './filters'
import { SURGERY_DAY_SQL } from './surgeryDay'

// The anaemia thresholds come from the clinical library under the clinic's criteria, so the
// SQL classifies exactly as screening does (strict "<"); pregnancy is not applied after surgery.
// One pass, grouped by operation, surgeon and treatment; the two tables add those groups up.
const SQL = (where: string) => `${FACTS_ONCE}
SELECT x.procedure_id AS procedureId, x.surgeon_id AS surgeonId, (x.product IS NOT NULL) AS treated,
  COUNT(*) AS patients,
  SUM(x.surgery_hb IS NOT NULL) AS withHb,
  SUM(x.surgery_hb < IF(x.sex = 'male', :maleGL, :femaleGL)) AS stillAnaemic,
  SUM(x.units > 0) AS transfused,
  SUM(x.units) AS units
FROM (${SURGERY_DAY_SQL(where)}) x
GROUP BY procedureId, surgeonId, treated`

const NAMES_SQL = `SELECT 'p' AS kind, id, code AS groupKey, name FROM procedures WHERE id IN (:procedureIds)
  UNION ALL SELECT 'u', id, CAST(id AS CHAR), name FROM users WHERE id IN (:surgeonIds)`

const COLUMNS = [
  'groupKey',
  'groupName',
  'treated',
  'patients',
  'withHb',
  'stillAnaemic',
  'stillAnaemicPercent',
  'transfused',
  'transfusionRatePercent',
  'units',
  'unitsPerPatient',
]

export async function transfusionReport(sequelize: Sequelize, f: ReportFilters): Promise<Report> {
  const settings = await getClinicSettings()
  const threshold = (sex: 'male' | 'female') => classifyAnaemia({ hbGL: 100, sex, criteria: settings.anaemiaCriteria })
  const male = threshold('male')
  const female = threshold('female')
  const w = whereFor(f, 'surgery')
  const replacements = { ...w.replacements, maleGL: male.thresholdGL, femaleGL: female.thresholdGL }
  const period = `${PERIOD_BASIS.surgery} (${f.from} to ${f.to})`
  const definitions: Record<string, Definition> = {
    treated: { numerator: 'Treated = at least one iron dose given on or before the surgery date', denominator: '—', period },
    stillAnaemicPercent: {
      numerator: `Episodes whose last Hb on or before the surgery date is anaemic (${male.basis}; ${female.basis}) × 100`,
      denominator: 'Episodes with an Hb on or before the surgery date',
      period,
    },
    transfusionRatePercent: {
      numerator: 'Episodes given ≥ 1 red-cell unit during or after surgery × 100',
      denominator: 'Episodes with a post-operative record',
      period,
    },
    unitsPerPatient: {
      numerator: 'Red-cell units transfused during and after surgery',
      denominator: 'Episodes with a post-operative record',
      period,
    },
  }
  const found = (await select<Record<string, unknown>>(sequelize, SQL(w.sql), replacements)).map((g) => ({
    procedureId: num(g.procedureId)!,
    surgeonId: num(g.surgeonId)!,
    treated: num(g.treated) === 1,
    patients: num(g.patients) ?? 0,
    withHb: num(g.withHb) ?? 0,
    stillAnaemic: num(g.stillAnaemic) ?? 0,
    transfused: num(g.transfused) ?? 0,
    units: num(g.units) ?? 0,
  }))
  const names =
    found.length === 0
      ? []
      : await select<{ kind: string; id: number; groupKey: string; name: string }>(sequelize, NAMES_SQL, {
          procedureIds: [...new Set(found.map((g) => g.procedureId))],
          surgeonIds: [...new Set(found.map((g) => g.surgeonId))],
        })
  const nameOf = (kind: 'p' | 'u', id: number) =>
    names.find((n) => n.kind === kind && Number(n.id) === id) ?? { groupKey: String(id), name: '' }
  const table = (kind: 'p' | 'u', idOf: (g: (typeof found)[number]) => number): ReportTable => {
    const sums = new Map<
      string,
      {
        groupKey: string
        groupName: string
        treated: boolean
        patients: number
        withHb: number
        stillAnaemic: number
        transfused: number
        units: number
      }
    >()
    for (const g of found) {
      const n = nameOf(kind, idOf(g))
      const key = `${n.groupKey}\u0000${g.treated}`
      const s = sums.get(key) ?? {
        groupKey: n.groupKey,
        groupName: n.name,
        treated: g.treated,
        patients: 0,
        withHb: 0,
        stillAnaemic: 0,
        transfused: 0,
        units: 0,
      }
      s.patients += g.patients
      s.withHb += g.withHb
      s.stillAnaemic += g.stillAnaemic
      s.transfused += g.transfused
      s.units += g.units
      sums.set(key, s)
    }
    const rows = [...sums.values()]
      .sort((a, b) => (a.groupKey < b.groupKey ? -1 : a.groupKey > b.groupKey ? 1 : Number(a.treated) - Number(b.treated)))
      .map((s) => ({
        ...s,
        stillAnaemicPercent: pct(s.stillAnaemic, s.withHb),
        transfusionRatePercent: pct(s.transfused, s.patients),
        unitsPerPatient: s.patients > 0 ? round1(s.units / s.patients) : null,
      }))
    return {
      columns: COLUMNS.map((key) => ({ key, label: key })),
      rows: rows.map((r) => Object.fromEntries(COLUMNS.map((c) => [c, r[c as keyof typeof r]]))),
      definitions,
    }
  }
  return {
    report: 'transfusion',
    period: { from: f.from, to: f.to, basis: PERIOD_BASIS.surgery },
    filters: { surgeonId: f.surgeonId, procedureCode: f.procedureCode },
    tables: {
      byOperation: table('p', (g) => g.procedureId),
      bySurgeon: table('u', (g) => g.surgeonId),
    },
  }
}
