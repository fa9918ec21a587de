import type { AuditPage, AuditRow } from '../../shared/audit/views'
import { Op, type WhereOptions } from 'sequelize'
import { AuditEntry, Patient, User } from '../models/index'
import { recordAudit, type Actor } from './audit'
import { Invalid } from '../errors'
import { LIMITS, windowTooLong } from '../../shared/limits'

export const AUDIT_PAGE_SIZE = 50
/** A CSV export is capped so one click cannot pull the whole log into memory. */
export const AUDIT_EXPORT_LIMIT = 10_000

export interface AuditQuery {
  userId: number | null
  patientId: number | null
  mrn: string | null
  entity: string | null
  action: string | null
  from: string | null
  to: string | null
  page: number
}

const DATE = /^\d{4}-\d{2}-\d{2}$/

export function auditQuery(q: Record<string, unknown>): AuditQuery {
  const str = (k: string) => (typeof q[k] === 'string' && q[k] !== '' ? (q[k] as string) : null)
  const id = (k: string) => {
    const v = str(k)
    if (v === null) return null
    const n = Number(v)
    if (!Number.isSafeInteger(n) || n <= 0)
      throw new Invalid(`${k} must be a positive whole number`, { [k]: 'must be a positive whole number' })
    return n
  }
  for (const k of ['from', 'to']) {
    const v = str(k)
    if (v !== null && !DATE.test(v)) throw new Invalid(`${k} must be a date (YYYY-MM-DD)`, { [k]: 'must be a date (YYYY-MM-DD)' })
  }
  const from = str('from')
  if (from !== null) {
    const to = str('to') ?? new Date().toISOString().slice(0, 10)
    if (from > to) throw new Invalid('to must be on or after from', { to: 'must be on or after from' })
    const tooLong = windowTooLong(from, to, LIMITS.auditDays, 'The audit search window')
    if (tooLong) throw new Invalid(tooLong, { from: `must be within ${LIMITS.auditDays} days of to` })
  }
  const mrn = str('mrn')?.trim() || null
  if (mrn !== null && mrn.length > 40) throw new Invalid('mrn must be at most 40 characters', { mrn: 'must be at most 40 characters' })
  return {
    userId: id('userId'),
    patientId: id('patientId'),
    mrn,
    entity: str('entity'),
    action: str('action'),
    from: str('from'),
    to: str('to'),
    page: id('page') ?? 1,
  }
}

function whereOf(q: AuditQuery): WhereOptions {
  const where: Record<string | symbol, unknown> = {}
  if (q.userId !== null) where.userId = q.userId
  if (q.patientId !== null) where.patientId = q.patientId
  if (q.entity !== null) where.entity = q.entity
  if (q.action !== null) where.action = q.action
  const at: Record<symbol, Date> = {}
  if (q.from !== null) at[Op.gte] = new Date(`${q.from}T00:00:00.000Z`)
  if (q.to !== null) at[Op.lt] = new Date(new Date(`${q.to}T00:00:00.000Z`).getTime() + 86_400_000)
  if (q.from !== null || q.to !== null) where.at = at
  return where as WhereOptions
}

function toRow(e: AuditEntry & { user?: User | null }): AuditRow {
  return {
    id: Number(e.id),
    at: e.at.toISOString(),
    user: e.user ? { id: e.user.id, name: e.user.name } : null,
    action: e.action,
    entity: e.entity,
    entityId: e.entityId,
    patientId: e.patientId,
    before: e.before as AuditRow['before'],
    after: e.after as AuditRow['after'],
    requestId: e.requestId,
  }
}

/**
 * Searches the log, newest first. Reading the log is itself logged (after the search, so the
 * page shows the log as it was when asked).
 */
export async function searchAudit(actor: Actor, q: AuditQuery, exportAll = false): Promise<AuditPage> {
  const where = whereOf(q) as Record<string, unknown>
  // An administrator filters by MRN without reading the record: the id stays on the server.
  if (q.mrn !== null) {
    const patient = await Patient.findOne({ where: { mrn: q.mrn }, attributes: ['id'], raw: true })
    where.patientId = q.patientId !== null && q.patientId !== patient?.id ? -1 : (patient?.id ?? -1)
  }
  const limit = exportAll ? AUDIT_EXPORT_LIMIT : AUDIT_PAGE_SIZE
  const { rows, count } = await AuditEntry.findAndCountAll({
    where,
    include: [{ model: User, as: 'user', attributes: ['id', 'name'] }],
    order: [
      ['at', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
    offset: exportAll ? 0 : (q.page - 1) * AUDIT_PAGE_SIZE,
  })
  const { page: _page, ...filters } = q
  await recordAudit(null, actor, {
    action: exportAll ? 'export' : 'view',
    entity: 'audit-trail',
    after: { filters, page: q.page, rows: rows.length },
  })
  return { rows: (rows as (AuditEntry & { user?: User | null })[]).map(toRow), total: count, page: exportAll ? 1 : q.page, pageSize: limit }
}
