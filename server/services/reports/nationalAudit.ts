import type { Sequelize } from 'sequelize'
import { TXA_EXPECTED_LOSS_ML } from '../../../shared/reports/quality'
import { classifyAnaemia } from '../../../shared/clinical'
import { daysBetween } from '../../../shared/pathway'
import { getClinicSettings } from '../clinicSettings'
import { recordAudit } from '../audit'
import type { Viewer } from '../viewer'
import { num, select, whereFor, type ReportFilters } from './filters'
import { EPISODE_FACTS_SQL } from './qualitySql'
import { safeCsv } from './csvSafe'

/** The columns of the national-audit export, in order; the README's data dictionary describes each. */
export const NATIONAL_AUDIT_COLUMNS = [
  'episodeId',
  'procedureCode',
  'sex',
  'ageAtSurgeryYears',
  'listingDate',
  'plannedSurgeryDate',
  'surgeryDate',
  'firstHbDate',
  'firstHbGL',
  'daysFirstHbToSurgery',
  'daysListingToFirstHb',
  'screenedInWindow14to45',
  'ironDeficiencyAnaemia',
  'ironBeforeSurgery',
  'postOperativeIron',
  'surgeryDayHbGL',
  'anaemicOnDayOfSurgery',
  'expectedBloodLossMl',
  'moderateBloodLossExpected',
  'tranexamicAcidGiven',
  'cellSalvageUsed',
  'cellSalvageReturnedMl',
  'redCellTransfusions',
  'redCellUnits',
  'singleUnitTransfusions',
  'reassessedAfterEachUnit',
  'lowestPreTransfusionHbGL',
  'otherComponentUnits',
  'transfusionInformationGiven',
  'transfusionConsent',
  'postponementsForAnaemia',
  'lengthOfStayDays',
] as const

const day = (v: unknown) => (v == null ? null : v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10))
const yn = (v: unknown) => (v == null ? '' : Number(v) === 1 ? 'yes' : 'no')

function ageOn(dateOfBirth: string, onDay: string): number {
  const [by, bm, bd] = dateOfBirth.split('-').map(Number) as [number, number, number]
  const [y, m, d] = onDay.split('-').map(Number) as [number, number, number]
  return y - by - (m < bm || (m === bm && d < bd) ? 1 : 0)
}

/** One row per operated episode in the period; no name, record number or date of birth leaves. */
export async function nationalAuditCsv(sequelize: Sequelize, viewer: Viewer, f: ReportFilters): Promise<string> {
  const settings = await getClinicSettings()
  const thresholdFor = (sex: string) =>
    classifyAnaemia({ hbGL: 100, sex: sex === 'male' ? 'male' : 'female', criteria: settings.anaemiaCriteria }).thresholdGL
  const w = whereFor(f, 'surgery')
  const facts = await select<Record<string, unknown>>(sequelize, `${EPISODE_FACTS_SQL(w.sql)} ORDER BY o.surgery_date, r.id`, {
    ...w.replacements,
    txaLossMl: TXA_EXPECTED_LOSS_ML,
  })
  const rows = facts.map((x) => {
    const surgeryDate = day(x.surgeryDate)!
    const firstHbDate = day(x.firstHbAt)
    const firstHb = num(x.firstHbGL)
    const dayHb = num(x.surgeryDayHbGL)
    const threshold = thresholdFor(String(x.sex))
    const listing = day(x.listingDate)
    return {
      episodeId: num(x.id),
      procedureCode: String(x.procedureCode),
      sex: String(x.sex),
      ageAtSurgeryYears: ageOn(day(x.dateOfBirth)!, surgeryDate),
      listingDate: listing,
      plannedSurgeryDate: day(x.plannedSurgeryDate),
      surgeryDate,
      firstHbDate,
      firstHbGL: firstHb,
      daysFirstHbToSurgery: firstHbDate ? daysBetween(firstHbDate, surgeryDate) : null,
      daysListingToFirstHb: listing && firstHbDate ? daysBetween(listing, firstHbDate) : null,
      screenedInWindow14to45: yn(x.screenedInWindow),
      ironDeficiencyAnaemia: firstHb == null ? '' : yn(firstHb < threshold && Number(x.ironDeficient) === 1 ? 1 : 0),
      ironBeforeSurgery: yn(x.ironBefore),
      postOperativeIron: yn(x.postOpIron),
      surgeryDayHbGL: dayHb,
      anaemicOnDayOfSurgery: dayHb == null ? '' : yn(dayHb < threshold ? 1 : 0),
      expectedBloodLossMl: num(x.expectedLossMl),
      moderateBloodLossExpected: yn(x.moderateLoss),
      tranexamicAcidGiven: yn(x.txaGiven),
      cellSalvageUsed: yn(x.cellSalvageUsed),
      cellSalvageReturnedMl: num(x.cellSalvageMl),
      redCellTransfusions: num(x.rbcRows),
      redCellUnits: num(x.rbcUnits),
      singleUnitTransfusions: num(x.rbcSingle),
      reassessedAfterEachUnit: num(x.rbcReassessed),
      lowestPreTransfusionHbGL: num(x.lowestPreHbGL),
      otherComponentUnits: num(x.otherUnits),
      transfusionInformationGiven: yn(
        Number(x.infoOnRecord) === 1 || Number(x.infoOnTransfusion) === 1
          ? 1
          : x.infoOnRecord == null && Number(x.anyTransfusions) === 0
            ? null
            : 0,
      ),
      transfusionConsent: yn(x.consent),
      postponementsForAnaemia: num(x.postponementsForAnaemia),
      lengthOfStayDays: num(x.lengthOfStayDays),
    }
  })
  await recordAudit(null, viewer, { action: 'export', entity: 'national-audit-export', after: { filters: f, rows: rows.length } })
  return safeCsv(NATIONAL_AUDIT_COLUMNS, rows)
}
