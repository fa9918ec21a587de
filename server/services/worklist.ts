import { QueryTypes, type Sequelize } from 'sequelize'
import {
  PRE_OPERATIVE_STAGES,
  PRIORITIES,
  STAGES,
  STAGE_LABELS,
  SURGERY_SOON_DAYS,
  addDays,
  daysBetween,
  nextAction,
  referralFlags,
  type Stage,
  type WorklistFlag,
} from '../../shared/pathway'
import type { WorklistQuery, WorklistSort } from '../../shared/schemas/referrals'
import type { AppointmentKind, AppointmentStatus } from '../../shared/appointments'
import { Forbidden } from '../errors'
import { isoOrNull, type Viewer } from './viewer'
import { cachedCount } from './worklistCounts'
import { zoneOffsetMs } from '../../shared/appointments/time'
import { clinicTimeZone, clinicToday } from './clinicDay'

const quoted = (xs: readonly string[]) => xs.map((x) => `'${x}'`).join(',')
const PRE_OP = `(${quoted(PRE_OPERATIVE_STAGES)})`

/**
 * The flags as SQL over columns of the referral row only (no subqueries), so each filter is an
 * index range. They mirror referralFlags() in shared/pathway/flags.ts, which labels each row;
 * the API tests check that the two agree. Instants are stored in UTC; the day an Hb was taken is
 * read on the clinic's calendar by adding the zone's offset now (a sample from before a clock
 * change may be an hour off, which only matters within an hour of midnight).
 */
const FLAG_SQL: Record<WorklistFlag, string> = {
  'surgery-soon-anaemic': `(r.anaemic = 1 AND r.planned_surgery_date BETWEEN :today AND :soon AND r.stage IN ${PRE_OP})`,
  'no-screening-result': `(r.latest_hb_at IS NULL AND r.stage IN ${PRE_OP})`,
  'recheck-overdue': `(r.recheck_due_date < :today AND r.stage IN ('treating','recheck') AND (r.latest_hb_at IS NULL OR DATE(DATE_ADD(r.latest_hb_at, INTERVAL :zoneOffsetMin MINUTE)) < r.recheck_due_date))`,
  'treatment-not-given': `(r.treatment_ordered_at IS NOT NULL AND r.treatment_given_at IS NULL AND r.stage IN ${PRE_OP})`,
  'date-change-requested': `(r.date_change_requested_at IS NOT NULL AND r.stage IN ${PRE_OP})`,
  'no-response-to-iron': `(r.no_response_to_iron = 1 AND r.stage IN ${PRE_OP})`,
  'hb-falling': `(r.hb_falling_after_iron = 1 AND r.stage IN ${PRE_OP})`,
}

const byDate = 'r.planned_surgery_date'
// Every order ends in r.id so pages never overlap or skip rows that tie.
const SORT_SQL: Record<WorklistSort, string> = {
  plannedSurgeryDate: `${byDate} ASC, r.id ASC`,
  '-plannedSurgeryDate': `${byDate} DESC, r.id DESC`,
  daysToSurgery: `${byDate} ASC, r.id ASC`,
  '-daysToSurgery': `${byDate} DESC, r.id DESC`,
  // Lowest Hb first; episodes without an Hb go last either way. The sort keys are indexed
  // generated columns (migration 0005) that put a missing Hb last, so paging reads the index.
  latestHb: `r.hb_sort_asc ASC, ${byDate} ASC, r.id ASC`,
  '-latestHb': `r.hb_sort_desc ASC, ${byDate} ASC, r.id ASC`,
  // The pathway's own order, not the alphabet.
  stage: `FIELD(r.stage, ${quoted(STAGES)}) ASC, ${byDate} ASC, r.id ASC`,
  '-stage': `FIELD(r.stage, ${quoted(STAGES)}) DESC, ${byDate} ASC, r.id ASC`,
  familyName: `pa.family_name ASC, pa.given_name ASC, r.id ASC`,
  '-familyName': `pa.family_name DESC, pa.given_name DESC, r.id DESC`,
  // Most pressing first: cancer pathway, urgent, routine.
  priority: `FIELD(r.priority, ${quoted([...PRIORITIES].reverse())}) ASC, ${byDate} ASC, r.id ASC`,
  '-priority': `FIELD(r.priority, ${quoted([...PRIORITIES].reverse())}) DESC, ${byDate} ASC, r.id ASC`,
  createdAt: `r.created_at ASC, r.id ASC`,
  '-createdAt': `r.created_at DESC, r.id DESC`,
}

const likePrefix = (s: string) => `${s.replace(/[\\%_]/g, (c) => `\\${c}`)}%`

interface WorklistSqlRow {
  id: number
  version: number
  stage: Stage
  priority: string
  plannedSurgeryDate: string
  latestHbGL: number | null
  latestHbAt: Date | string | null
  ironStatus: string | null
  anaemic: number | boolean | null
  proposedStage: Stage | null
  recheckDueDate: string | null
  treatmentOrderedAt: Date | string | null
  treatmentGivenAt: Date | string | null
  dateChangeRequestedAt: Date | string | null
  noResponseToIron: number | boolean
  hbFallingAfterIron: number | boolean
  patientId: number
  mrn: string
  givenName: string
  familyName: string
  dateOfBirth: string
  sex: string
  procedureCode: string
  procedureName: string
  surgeonId: number
  surgeonName: string
}

/**
 * The clinic's live list: filtered, sorted and paged in one indexed SELECT (joined to patient,
 * operation and surgeon) plus a COUNT with the same filter. Surgeons see only their own
 * patients; asking for another surgeon's list is refused rather than silently narrowed.
 */
export async function worklist(sequelize: Sequelize, viewer: Viewer, q: WorklistQuery) {
  if (viewer.role === 'surgeon' && q.surgeonId !== undefined && q.surgeonId !== viewer.userId) {
    throw new Forbidden("Surgeons see their own patients only", 'not_your_patient')
  }
  const today = clinicToday()
  const where: string[] = []
  const params: Record<string, unknown> = { today, soon: addDays(today, SURGERY_SOON_DAYS), zoneOffsetMin: Math.round(zoneOffsetMs(new Date(), clinicTimeZone()) / 60_000) }
  const surgeonId = viewer.role === 'surgeon' || q.mine ? viewer.userId : q.surgeonId
  if (surgeonId !== undefined) { where.push('r.surgeon_id = :surgeonId'); params.surgeonId = surgeonId }
  if (q.stage?.length) { where.push('r.stage IN (:stages)'); params.stages = q.stage }
  if (q.priority?.length) { where.push('r.priority IN (:priorities)'); params.priorities = q.priority }
  // A constant subquery (evaluated once), so the filter is on the referral row's own index.
  if (q.procedureCode) { where.push('r.procedure_id = (SELECT id FROM procedures WHERE code = :procedureCode)'); params.procedureCode = q.procedureCode }
  if (q.from) { where.push(`${byDate} >= :from`); params.from = q.from }
  if (q.to) { where.push(`${byDate} <= :to`); params.to = q.to }
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
  const sort = (q.sort ?? 'plannedSurgeryDate') as WorklistSort
  // Read referrals first, in the sort's index order, and join only the page's rows. The
  // optimiser otherwise starts from the ten-row operations table and sorts every referral.
  // Name sorts and searches are left to the optimiser, which starts from the patients.
  const straight = terms.length || sort.endsWith('amilyName') ? '' : 'STRAIGHT_JOIN'
  const page = q.page ?? 1
  const pageSize = q.pageSize ?? 25
  // Foreign keys guarantee the joined rows exist, so the count reads referrals (and any search).
  const countFrom = `FROM referrals r ${searchJoins}`
  const [rows, total] = await Promise.all([
    sequelize.query<WorklistSqlRow>(
      `SELECT ${straight} r.id, r.version, r.stage, r.priority, r.planned_surgery_date AS plannedSurgeryDate,
         r.latest_hb_gl AS latestHbGL, r.latest_hb_at AS latestHbAt, r.iron_status AS ironStatus, r.anaemic,
         r.proposed_stage AS proposedStage, r.recheck_due_date AS recheckDueDate,
         r.treatment_ordered_at AS treatmentOrderedAt, r.treatment_given_at AS treatmentGivenAt,
         r.date_change_requested_at AS dateChangeRequestedAt,
         r.no_response_to_iron AS noResponseToIron, r.hb_falling_after_iron AS hbFallingAfterIron,
         pa.id AS patientId, pa.mrn, pa.given_name AS givenName, pa.family_name AS familyName,
         pa.date_of_birth AS dateOfBirth, pa.sex,
         pr.code AS procedureCode, pr.name AS procedureName, u.id AS surgeonId, u.name AS surgeonName
       FROM referrals r ${searchJoins}
         JOIN patients pa ON pa.id = r.patient_id
         JOIN procedures pr ON pr.id = r.procedure_id
         JOIN users u ON u.id = r.surgeon_id
       ${whereSql}
       ORDER BY ${SORT_SQL[sort]}
       LIMIT :limit OFFSET :offset`,
      { type: QueryTypes.SELECT, replacements: { ...params, limit: pageSize, offset: (page - 1) * pageSize } },
    ),
    cachedCount(`${countFrom} ${whereSql} ${JSON.stringify(params)}`, async () => {
      const r = await sequelize.query<{ total: number | bigint }>(`SELECT COUNT(*) AS total ${countFrom} ${whereSql}`, { type: QueryTypes.SELECT, replacements: params })
      return Number(r[0]?.total ?? 0)
    }),
  ])
  const next = await nextAppointments(sequelize, rows.map((r) => r.id))
  return {
    rows: rows.map((row) => ({ ...toWorklistRow(row, today), nextAppointment: next.get(row.id) ?? null })),
    total,
    page,
    pageSize,
  }
}

export interface NextAppointment { kind: AppointmentKind; startsAt: string; status: AppointmentStatus }

/**
 * Each episode's next visit that is still on, for the page's rows only: one query over the
 * (referral_id, starts_at) index, not one per row, so the worklist stays one round trip wider.
 */
async function nextAppointments(sequelize: Sequelize, referralIds: number[]): Promise<Map<number, NextAppointment>> {
  const out = new Map<number, NextAppointment>()
  if (!referralIds.length) return out
  const rows = await sequelize.query<{ referralId: number; kind: AppointmentKind; startsAt: Date | string; status: AppointmentStatus }>(
    `SELECT referral_id AS referralId, kind, starts_at AS startsAt, status FROM appointments
     WHERE referral_id IN (:ids) AND status <> 'cancelled' AND starts_at >= :now
     ORDER BY referral_id, starts_at, id`,
    { type: QueryTypes.SELECT, replacements: { ids: referralIds, now: new Date() } },
  )
  // Rows come soonest first per episode, so the first one seen is the next visit.
  for (const r of rows) if (!out.has(r.referralId)) out.set(r.referralId, { kind: r.kind, startsAt: isoOrNull(r.startsAt)!, status: r.status })
  return out
}

function toWorklistRow(row: WorklistSqlRow, today: string) {
  const anaemic = row.anaemic == null ? null : Boolean(row.anaemic)
  return {
    id: row.id,
    version: row.version,
    stage: row.stage,
    stageLabel: STAGE_LABELS[row.stage],
    nextAction: nextAction(row.stage),
    priority: row.priority,
    plannedSurgeryDate: row.plannedSurgeryDate,
    daysToSurgery: daysBetween(today, row.plannedSurgeryDate),
    latestHbGL: row.latestHbGL,
    latestHbAt: isoOrNull(row.latestHbAt),
    ironStatus: row.ironStatus,
    anaemic,
    proposedStage: row.proposedStage,
    flags: referralFlags({ ...row, anaemic }, today, clinicTimeZone()),
    mrn: row.mrn,
    patientName: `${row.familyName}, ${row.givenName}`,
    patient: { id: row.patientId, mrn: row.mrn, givenName: row.givenName, familyName: row.familyName, dateOfBirth: row.dateOfBirth, sex: row.sex },
    procedure: { code: row.procedureCode, name: row.procedureName },
    surgeon: { id: row.surgeonId, name: row.surgeonName },
  }
}
