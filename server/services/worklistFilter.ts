import type { Sequelize } from 'sequelize'
import { PRE_OPERATIVE_STAGES, SURGERY_SOON_DAYS, addDays, type WorklistFlag } from '../../shared/pathway'
import type { WorklistQuery } from '../../shared/schemas/referrals'
import { zoneOffsetMs } from '../../shared/appointments/time'
import { Forbidden } from '../errors'
import type { Viewer } from './viewer'
import { cachedCount, type WorklistSource } from './worklistCounts'
import { rawSelect } from './rawRead'
import { clinicTimeZone, clinicToday } from './clinicDay'
import { seesOwnPatientsOnly } from '../../shared/permissions'

export const quoted = (xs: readonly string[]) => xs.map((x) => `'${x}'`).join(',')
const PRE_OP = `(${quoted(PRE_OPERATIVE_STAGES)})`
export const BY_DATE = 'r.planned_surgery_date'

/**
 * The flags as SQL over columns of the referral row only (no subqueries), so each filter is an
 * index range. They mirror referralFlags() in shared/pathway/flags.ts, which labels each row;
 * tests/api/pathway-worklist-flag-sql.test.ts runs both on the same cases. Instants are stored in UTC; the day an Hb was taken is
 * read on the clinic's calendar by adding the zone's offset now (a sample from before a clock
 * change may be an hour off, which only matters within an hour of midnight).
 */
export const FLAG_SQL: Record<WorklistFlag, string> = {
  'surgery-soon-anaemic': `(r.anaemic = 1 AND r.planned_surgery_date BETWEEN :today AND :soon AND r.stage IN ${PRE_OP})`,
  'no-screening-result': `(r.latest_hb_at IS NULL AND r.stage IN ${PRE_OP})`,
  'recheck-overdue':
    `(r.recheck_due_date < :today AND r.stage IN ('treating','recheck') AND (r.latest_hb_at IS NULL OR ` +
    `DATE(DATE_ADD(r.latest_hb_at, INTERVAL :zoneOffsetMin MINUTE)) < r.recheck_due_date))`,
  'treatment-not-given': `(r.treatment_ordered_at IS NOT NULL AND r.treatment_given_at IS NULL AND r.stage IN ${PRE_OP})`,
  'date-change-requested': `(r.date_change_requested_at IS NOT NULL AND r.stage IN ${PRE_OP})`,
  'no-response-to-iron': `(r.no_response_to_iron = 1 AND r.stage IN ${PRE_OP})`,
  'hb-falling': `(r.hb_falling_after_iron = 1 AND r.stage IN ${PRE_OP})`,
}

/** The named values FLAG_SQL reads, for the clinic's day `today` in `timeZone`. */
export function flagParams(today: string, timeZone: string, now = new Date()): Record<string, unknown> {
  return { today, soon: addDays(today, SURGERY_SOON_DAYS), zoneOffsetMin: Math.round(zoneOffsetMs(now, timeZone) / 60_000) }
}

const likePrefix = (s: string) => `${s.replace(/[\\%_]/g, (c) => `\\${c}`)}%`

/** The filter part of a worklist query: what narrows the list, not how it is sorted or paged. */
export type WorklistFilterQuery = Omit<WorklistQuery, 'sort' | 'page' | 'pageSize'>

export interface WorklistFilter {
  today: string
  whereSql: string
  searchJoins: string
  searched: boolean
  params: Record<string, unknown>
}

/**
 * The WHERE clause and joins for one slice of the worklist. Surgeons see only their own patients;
 * asking for another surgeon's list is refused rather than silently narrowed.
 */
export function worklistFilter(viewer: Viewer, q: WorklistFilterQuery): WorklistFilter {
  if (seesOwnPatientsOnly(viewer.role) && q.surgeonId !== undefined && q.surgeonId !== viewer.userId) {
    throw new Forbidden('Surgeons see their own patients only', 'not_your_patient')
  }
  const today = clinicToday()
  const where: string[] = []
  const params: Record<string, unknown> = flagParams(today, clinicTimeZone())
  const surgeonId = seesOwnPatientsOnly(viewer.role) || q.mine ? viewer.userId : q.surgeonId
  if (surgeonId !== undefined) {
    where.push('r.surgeon_id = :surgeonId')
    params.surgeonId = surgeonId
  }
  if (q.stage?.length) {
    where.push('r.stage IN (:stages)')
    params.stages = q.stage
  }
  if (q.priority?.length) {
    where.push('r.priority IN (:priorities)')
    params.priorities = q.priority
  }
  // A constant subquery (evaluated once), so the filter is on the referral row's own index.
  if (q.procedureCode) {
    where.push('r.procedure_id = (SELECT id FROM procedures WHERE code = :procedureCode)')
    params.procedureCode = q.procedureCode
  }
  if (q.from) {
    where.push(`${BY_DATE} >= :from`)
    params.from = q.from
  }
  if (q.to) {
    where.push(`${BY_DATE} <= :to`)
    params.to = q.to
  }
  // Several flags mean "any of them", like several stages.
  if (q.flag?.length) where.push(`(${q.flag.map((f) => FLAG_SQL[f as WorklistFlag]).join(' OR ')})`)
  const terms = (q.q ?? '').split(/\s+/).filter(Boolean).slice(0, 4)
  // A name or MRN search starts from the few matching patients: one prefix search per indexed
  // column, unioned, joined as a derived table (an OR across three columns reads every patient,
  // and an IN (...) subquery is re-run for every referral).
  const searchJoins = terms
    .map((term, i) => {
      params[`q${i}`] = likePrefix(term)
      return `JOIN (SELECT id FROM patients WHERE mrn LIKE :q${i} UNION SELECT id FROM patients WHERE family_name LIKE :q${i}
        UNION SELECT id FROM patients WHERE given_name LIKE :q${i}) s${i} ON s${i}.id = r.patient_id`
    })
    .join(' ')
  const whereSql = where.length ? `WHERE ${where.join(' AND ')}` : ''
  return { today, whereSql, searchJoins, searched: terms.length > 0, params }
}

/** How many episodes the slice holds, through the shared count cache (worklistCounts.ts). */
export function countWorklist(sequelize: Sequelize, f: WorklistFilter): Promise<number> {
  // Foreign keys guarantee the joined rows exist, so the count reads referrals (and any search).
  const countFrom = `FROM referrals r ${f.searchJoins}`
  return cachedCount(
    `${countFrom} ${f.whereSql} ${JSON.stringify(f.params)}`,
    countSources(f.searched, 'procedureCode' in f.params),
    async () => {
      // Sent as text, not prepared: a total is counted once per slice every few seconds, so a prepared
      // statement saves nothing, and MariaDB was seen to count a prepared whole-list COUNT(*) by reading
      // the table's rows instead of its smallest index.
      const r = await rawSelect<{ total: number | bigint }>(sequelize, `SELECT COUNT(*) AS total ${countFrom} ${f.whereSql}`, f.params, {
        prepared: false,
      })
      return Number(r[0]?.total ?? 0)
    },
  )
}

/** The tables a total reads, so a change to one of them forgets only the totals it can move. */
function countSources(search: boolean, byProcedure: boolean): WorklistSource[] {
  return ['referral', ...(search ? ['patient' as const] : []), ...(byProcedure ? ['procedure' as const] : [])]
}
