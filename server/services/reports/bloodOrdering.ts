import type { Sequelize } from 'sequelize'
import { PERIOD_BASIS, type Report } from '../../../shared/reports'
import { crossmatchToTransfusionRatio, suggestBloodOrder, transfusionIndex, transfusionProbabilityPercent } from '../../../shared/clinical'
import { num, round1, select, whereFor, type ReportFilters } from './filters'

const SQL = (where: string) => `
SELECT p.code, p.name, p.usual_blood_order AS usualOrder, p.usual_units AS usualUnits, p.expected_blood_loss_ml AS usualLossMl,
  COUNT(*) AS patients,
  SUM(o.units_crossmatched > 0) AS patientsCrossmatched,
  SUM(o.units_crossmatched) AS unitsCrossmatched,
  SUM(IF(o.units_crossmatched > 0, o.units_transfused_intra_op + o.units_transfused_post_op, 0)) AS unitsTransfused,
  SUM(o.units_crossmatched > 0 AND o.units_transfused_intra_op + o.units_transfused_post_op > 0) AS patientsTransfused,
  SUM(o.units_transfused_intra_op + o.units_transfused_post_op > 0) AS patientsTransfusedAll,
  AVG(o.blood_loss_ml) AS meanLossMl
FROM outcomes o JOIN referrals r ON r.id = o.referral_id JOIN procedures p ON p.id = r.procedure_id
WHERE ${where}
GROUP BY p.id, p.code, p.name, p.usual_blood_order, p.usual_units, p.expected_blood_loss_ml
ORDER BY p.code`

const round2 = (v: number | null) => (v == null ? null : Math.round(v * 100) / 100)

export async function bloodOrderingReport(sequelize: Sequelize, f: ReportFilters): Promise<Report> {
  const w = whereFor(f, 'surgery')
  const found = await select<Record<string, unknown>>(sequelize, SQL(w.sql), w.replacements)
  const rows = found.map((g) => {
    const c = {
      unitsCrossmatched: num(g.unitsCrossmatched) ?? 0,
      unitsTransfused: num(g.unitsTransfused) ?? 0,
      patientsCrossmatched: num(g.patientsCrossmatched) ?? 0,
      patientsTransfused: num(g.patientsTransfused) ?? 0,
      patients: num(g.patients) ?? 0,
      patientsTransfusedAll: num(g.patientsTransfusedAll) ?? 0,
    }
    const current = { order: g.usualOrder as 'group-and-screen' | 'crossmatch', units: num(g.usualUnits) ?? 0 }
    const s = suggestBloodOrder(current, c)
    return {
      procedureCode: String(g.code),
      procedureName: String(g.name),
      patients: c.patients,
      patientsCrossmatched: c.patientsCrossmatched,
      unitsCrossmatched: c.unitsCrossmatched,
      patientsTransfused: c.patientsTransfused,
      unitsTransfused: c.unitsTransfused,
      ctRatio: round2(crossmatchToTransfusionRatio(c)),
      transfusionProbabilityPercent: round1(transfusionProbabilityPercent(c)),
      transfusionIndex: round2(transfusionIndex(c)),
      usualBloodOrder: current.order,
      usualUnits: current.units,
      suggestion: s.suggestion,
      suggestionReason: s.reason,
      meanBloodLossMl: round1(num(g.meanLossMl)),
      usualBloodLossMl: num(g.usualLossMl),
    }
  })
  const period = `${PERIOD_BASIS.surgery} (${f.from} to ${f.to})`
  const xm = 'crossmatched patients (units crossmatched > 0)'
  return {
    report: 'blood-ordering',
    period: { from: f.from, to: f.to, basis: PERIOD_BASIS.surgery },
    filters: { surgeonId: f.surgeonId, procedureCode: f.procedureCode },
    tables: {
      bloodOrdering: {
        columns: [
          'procedureCode',
          'procedureName',
          'patients',
          'patientsCrossmatched',
          'unitsCrossmatched',
          'patientsTransfused',
          'unitsTransfused',
          'ctRatio',
          'transfusionProbabilityPercent',
          'transfusionIndex',
          'usualBloodOrder',
          'usualUnits',
          'suggestion',
          'suggestionReason',
          'meanBloodLossMl',
          'usualBloodLossMl',
        ].map((key) => ({ key, label: key })),
        rows,
        definitions: {
          ctRatio: {
            numerator: 'Units crossmatched',
            denominator: `Units transfused to ${xm}; acceptable ≤ 2.5 (clinical reference §9)`,
            period,
          },
          transfusionProbabilityPercent: { numerator: `Transfused ${xm} × 100`, denominator: xm, period },
          transfusionIndex: {
            numerator: `Units transfused to ${xm}`,
            denominator: `${xm}; ≥ 0.5 justifies crossmatching (clinical reference §9)`,
            period,
          },
          meanBloodLossMl: {
            numerator: 'Sum of measured blood loss (mL)',
            denominator: 'Operated episodes with a post-operative record',
            period,
          },
          suggestion: {
            numerator:
              'Crossmatch with TI < 0.5 and T% < 30 → group-and-screen; C:T > 2.5 → fewer units; group-and-screen with ≥ 30% ' +
              'transfused → crossmatch',
            denominator: "The catalogue's current order for the operation",
            period,
          },
        },
      },
    },
  }
}
