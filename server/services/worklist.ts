import type { Sequelize } from 'sequelize'
import {
  PRIORITIES,
  STAGES,
  STAGE_LABELS,
  daysBetween,
  nextAction,
  referralFlags,
  type FlagInput,
  type Priority,
  type Stage,
} from '../../shared/pathway'
import type { IronStatus, Sex } from '../../shared/clinical'
import type { WorklistQuery, WorklistSort } from '../../shared/schemas/referrals'
import type { AppointmentKind, AppointmentStatus } from '../../shared/appointments'
import type { NextAppointment, WorklistPage, WorklistRow } from '../../shared/pathway/views'
import type { Viewer } from './viewer'
import { clinicTimeZone } from './clinicDay'
import { BY_DATE, countWorklist, quoted, worklistFilter } from './worklistFilter'
import { isoFromUtcText, rawSelect } from './rawRead'

const byDate = BY_DATE
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

/** A page row as rawSelect returns it: DATE and DATETIME columns as UTC text (rawRead.ts). */
interface WorklistSqlRow {
  id: number
  version: number
  stage: Stage
  priority: Priority
  plannedSurgeryDate: string
  latestHbGL: number | null
  latestHbAt: string | null
  ironStatus: IronStatus | null
  anaemic: number | boolean | null
  proposedStage: Stage | null
  recheckDueDate: string | null
  treatmentOrderedAt: string | null
  treatmentGivenAt: string | null
  dateChangeRequestedAt: string | null
  noResponseToIron: number | boolean
  hbFallingAfterIron: number | boolean
  patientId: number
  mrn: string
  givenName: string
  familyName: string
  dateOfBirth: string
  sex: Sex
  procedureCode: string
  procedureName: string
  surgeonId: number
  surgeonName: string
  /** The next visit still on, as 'kind status startsAt' (see NEXT_VISIT_SQL), or null. */
  nextVisit: string | null
}

/**
 * Each row's next visit that is still on, in the page's own statement: one lookup over the
 * (referral_id, starts_at) index per row, and the request one round trip less. Only where the
 * referrals are read in the sort's order (STRAIGHT_JOIN): MariaDB then evaluates a select-list
 * subquery for the rows the LIMIT lets through (ANALYZE: 25 loops for a page of 25, also past an
 * OFFSET). Where it sorts the joined rows (name sort, search) it evaluates it for every row before
 * sorting (25 000 loops for a name sort), so those pages look the visits up afterwards instead.
 * Kind and status are words of fixed lists without spaces (APPOINTMENT_KINDS, APPOINTMENT_STATUSES);
 * the time is written as the ISO instant the API sends (the connection runs in UTC, db.ts;
 * starts_at is whole seconds, DATETIME).
 */
const NEXT_VISIT_SQL = `(SELECT CONCAT(a.kind, ' ', a.status, ' ', DATE_FORMAT(a.starts_at, '%Y-%m-%dT%H:%i:%s.000Z'))
    FROM appointments a WHERE a.referral_id = r.id AND a.status <> 'cancelled' AND a.starts_at >= :now
    ORDER BY a.starts_at, a.id LIMIT 1)`

/**
 * The clinic's live list: filtered, sorted and paged in one indexed SELECT (joined to patient,
 * operation and surgeon) plus a COUNT with the same filter. Surgeons see only their own
 * patients; asking for another surgeon's list is refused rather than silently narrowed.
 */
export async function worklist(sequelize: Sequelize, viewer: Viewer, q: WorklistQuery): Promise<WorklistPage> {
  const filter = worklistFilter(viewer, q)
  const { today, whereSql, searchJoins, params } = filter
  const sort = (q.sort ?? 'plannedSurgeryDate') as WorklistSort
  // Read referrals first, in the sort's index order, and join only the page's rows. The
  // optimiser otherwise starts from the ten-row operations table and sorts every referral.
  // Name sorts and searches are left to the optimiser, which starts from the patients.
  const straight = filter.searched || sort.endsWith('amilyName') ? '' : 'STRAIGHT_JOIN'
  const folded = straight !== ''
  const page = q.page ?? 1
  const pageSize = q.pageSize ?? 25
  const [rows, total] = await Promise.all([
    rawSelect<WorklistSqlRow>(
      sequelize,
      `SELECT ${straight} r.id, r.version, r.stage, r.priority, r.planned_surgery_date AS plannedSurgeryDate,
         r.latest_hb_gl AS latestHbGL, r.latest_hb_at AS latestHbAt, r.iron_status AS ironStatus, r.anaemic,
         r.proposed_stage AS proposedStage, r.recheck_due_date AS recheckDueDate,
         r.treatment_ordered_at AS treatmentOrderedAt, r.treatment_given_at AS treatmentGivenAt,
         r.date_change_requested_at AS dateChangeRequestedAt,
         r.no_response_to_iron AS noResponseToIron, r.hb_falling_after_iron AS hbFallingAfterIron,
         pa.id AS patientId, pa.mrn, pa.given_name AS givenName, pa.family_name AS familyName,
         pa.date_of_birth AS dateOfBirth, pa.sex,
         pr.code AS procedureCode, pr.name AS procedureName, u.id AS surgeonId, u.name AS surgeonName,
         ${folded ? NEXT_VISIT_SQL : 'NULL'} AS nextVisit
       FROM referrals r ${searchJoins}
         JOIN patients pa ON pa.id = r.patient_id
         JOIN procedures pr ON pr.id = r.procedure_id
         JOIN users u ON u.id = r.surgeon_id
       ${whereSql}
       ORDER BY ${SORT_SQL[sort]}
       LIMIT :limit OFFSET :offset`,
      { ...params, limit: pageSize, offset: (page - 1) * pageSize, ...(folded ? { now: new Date() } : {}) },
    ),
    countWorklist(sequelize, filter),
  ])
  const next = folded
    ? null
    : await nextAppointments(
        sequelize,
        rows.map((r) => r.id),
      )
  return {
    rows: rows.map((row) => toWorklistRow(row, today, next)),
    total,
    page,
    pageSize,
  }
}

/** The page's next visits in one query over the (referral_id, starts_at) index, for the pages sorted after the join. */
async function nextAppointments(sequelize: Sequelize, referralIds: number[]): Promise<Map<number, NextAppointment>> {
  const out = new Map<number, NextAppointment>()
  if (!referralIds.length) return out
  const rows = await rawSelect<{ referralId: number; kind: AppointmentKind; startsAt: string; status: AppointmentStatus }>(
    sequelize,
    `SELECT referral_id AS referralId, kind, starts_at AS startsAt, status FROM appointments
     WHERE referral_id IN (:ids) AND status <> 'cancelled' AND starts_at >= :now
     ORDER BY referral_id, starts_at, id`,
    { ids: referralIds, now: new Date() },
  )
  // Rows come soonest first per episode, so the first one seen is the next visit.
  for (const r of rows)
    if (!out.has(r.referralId)) out.set(r.referralId, { kind: r.kind, startsAt: isoFromUtcText(r.startsAt)!, status: r.status })
  return out
}

function nextVisitOf(text: string | null): NextAppointment | null {
  if (!text) return null
  const [kind, status, startsAt] = text.split(' ')
  return { kind: kind as AppointmentKind, startsAt: startsAt!, status: status as AppointmentStatus }
}

/** What referralFlags reads, without copying the whole row; `latestHbAt` as an ISO instant. */
function flagInput(row: WorklistSqlRow, anaemic: boolean | null, latestHbAt: string | null): FlagInput {
  return {
    stage: row.stage,
    plannedSurgeryDate: row.plannedSurgeryDate,
    anaemic,
    latestHbAt,
    recheckDueDate: row.recheckDueDate,
    treatmentOrderedAt: row.treatmentOrderedAt,
    treatmentGivenAt: row.treatmentGivenAt,
    dateChangeRequestedAt: row.dateChangeRequestedAt,
    noResponseToIron: row.noResponseToIron,
    hbFallingAfterIron: row.hbFallingAfterIron,
  }
}

function toWorklistRow(row: WorklistSqlRow, today: string, next: Map<number, NextAppointment> | null): WorklistRow {
  const anaemic = row.anaemic == null ? null : Boolean(row.anaemic)
  const latestHbAt = isoFromUtcText(row.latestHbAt)
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
    latestHbAt,
    ironStatus: row.ironStatus,
    anaemic,
    proposedStage: row.proposedStage,
    flags: referralFlags(flagInput(row, anaemic, latestHbAt), today, clinicTimeZone()),
    mrn: row.mrn,
    patientName: `${row.familyName}, ${row.givenName}`,
    patient: {
      id: row.patientId,
      mrn: row.mrn,
      givenName: row.givenName,
      familyName: row.familyName,
      dateOfBirth: row.dateOfBirth,
      sex: row.sex,
    },
    procedure: { code: row.procedureCode, name: row.procedureName },
    surgeon: { id: row.surgeonId, name: row.surgeonName },
    nextAppointment: next ? (next.get(row.id) ?? null) : nextVisitOf(row.nextVisit),
  }
}
