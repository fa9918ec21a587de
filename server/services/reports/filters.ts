import { QueryTypes, type Sequelize } from 'sequelize'
import { addDays } from '../../../shared/pathway'
import type { Viewer } from '../viewer'
import { Forbidden, Invalid } from '../../errors'
import { clinicToday } from '../clinicDay'
import { LIMITS, windowTooLong } from '../../../shared/limits'
import { seesOwnPatientsOnly } from '../../../shared/permissions'

export interface ReportFilters {
  from: string
  to: string
  surgeonId: number | null
  procedureCode: string | null
}

const DATE = /^\d{4}-\d{2}-\d{2}$/

/** Reads the query string; a surgeon sees only their own figures, whatever they ask for. */
export function reportFilters(viewer: Viewer, q: Record<string, unknown>): ReportFilters {
  const str = (k: string) => (typeof q[k] === 'string' && q[k] !== '' ? (q[k] as string) : null)
  const to = str('to') ?? clinicToday()
  const from = str('from') ?? addDays(to, -365)
  for (const [k, v] of [
    ['from', from],
    ['to', to],
  ] as const) {
    if (!DATE.test(v) || Number.isNaN(Date.parse(v)))
      throw new Invalid(`${k} must be a date (YYYY-MM-DD)`, { [k]: 'must be a date (YYYY-MM-DD)' })
  }
  if (from > to) throw new Invalid('from must be on or before to', { from: 'must be on or before to' })
  const tooLong = windowTooLong(from, to, LIMITS.reportDays, 'The report period')
  if (tooLong) throw new Invalid(tooLong, { from: `must be within ${LIMITS.reportDays} days of to` })
  let surgeonId: number | null = null
  const rawSurgeon = str('surgeonId')
  if (rawSurgeon !== null) {
    surgeonId = Number(rawSurgeon)
    if (!Number.isSafeInteger(surgeonId) || surgeonId <= 0)
      throw new Invalid('surgeonId must be a positive whole number', { surgeonId: 'must be a positive whole number' })
  }
  if (seesOwnPatientsOnly(viewer.role)) {
    if (surgeonId !== null && surgeonId !== viewer.userId) throw new Forbidden('Surgeons see their own figures only', 'not_your_patient')
    surgeonId = viewer.userId
  }
  const procedureCode = str('procedureCode')
  if (procedureCode !== null && procedureCode.length > 20)
    throw new Invalid('procedureCode is too long', { procedureCode: 'is at most 20 characters' })
  return { from, to, surgeonId, procedureCode }
}

/**
 * The WHERE clause shared by every report (referrals r, and outcomes o for the surgery-date
 * reports), with named replacements. The operation is matched by its id (one constant lookup of
 * the unique code), so the referral-period reports need no join to procedures: with that join
 * MariaDB walked referrals per procedure and read every full row instead of the period's range of
 * the covering index (migration 0025).
 */
export function whereFor(f: ReportFilters, basis: 'referral' | 'surgery'): { sql: string; replacements: Record<string, unknown> } {
  const parts =
    basis === 'referral'
      ? ['r.created_at >= :from', 'r.created_at < DATE_ADD(:to, INTERVAL 1 DAY)']
      : ['o.surgery_date >= :from', 'o.surgery_date <= :to']
  if (f.surgeonId !== null) parts.push('r.surgeon_id = :surgeonId')
  if (f.procedureCode !== null) parts.push('r.procedure_id = (SELECT pc.id FROM procedures pc WHERE pc.code = :procedureCode)')
  return { sql: parts.join(' AND '), replacements: { from: f.from, to: f.to, surgeonId: f.surgeonId, procedureCode: f.procedureCode } }
}

/**
 * For the reports that group per-episode facts (a derived table x of correlated lookups): MariaDB
 * otherwise merges x into the grouping query, and every reference to a fact re-runs its lookup (the
 * quality report names the first Hb four times, so it was looked up four times per episode). With
 * x materialized each lookup runs once per episode. Issue #19, on the bench database: MariaDB CPU for
 * the quality query 224 → 152 ms, haemoglobin 122 → 100, transfusion 100 → 90. For that statement only.
 */
export const FACTS_ONCE = "SET STATEMENT optimizer_switch = 'derived_merge=off' FOR"

export function select<T extends object>(sequelize: Sequelize, sql: string, replacements: Record<string, unknown>): Promise<T[]> {
  return sequelize.query<T>(sql, { type: QueryTypes.SELECT, replacements })
}

/** Numbers from SQL aggregates arrive as strings or bigints; reports speak plain numbers. */
export function num(v: unknown): number | null {
  if (v == null) return null
  const n = Number(v)
  return Number.isFinite(n) ? n : null
}

export const round1 = (v: number | null) => (v == null ? null : Math.round(v * 10) / 10)
export const pct = (n: number, d: number) => (d > 0 ? round1((100 * n) / d) : null)
