import { QueryTypes, type Transaction } from 'sequelize'
import { AuditEntry } from '../models/index'

/** Who is acting, passed from the route to every service that writes. */
export interface Actor {
  userId: number | null
  requestId: string | null
  ip: string | null
  /** The client re-read data a screen already shows (a poll, a refetch on focus): header X-Ferrolane-Refetch: 1. */
  refetch?: boolean
}

export interface AuditInput {
  action: string
  entity: string
  entityId?: string | number | null
  patientId?: number | null
  before?: object | null
  after?: object | null
  /** A person opening the record itself (the episode, the patient), not one of its parts. */
  opensRecord?: boolean
}

let viewWindowMs = 15 * 60_000

/** AUDIT_VIEW_WINDOW_MINUTES, set when the app is built; 0 audits every read. */
export function setViewAuditWindow(minutes: number): void {
  viewWindowMs = minutes * 60_000
}

/**
 * An open episode tab polls its parts every few seconds; auditing each poll buried the reads that
 * matter. A read of a record's parts, or any read the client marks as a background refetch, is
 * audited once per user, entity and record within the window. Opening the episode or the patient
 * (a person's act) is audited every time.
 */
async function alreadyViewed(actor: Actor, input: AuditInput): Promise<boolean> {
  // Reads without a record (an audit-trail search) keep one entry each: what was searched matters.
  if (input.action !== 'view' || viewWindowMs <= 0 || actor.userId == null || input.entityId == null) return false
  if (input.opensRecord && !actor.refetch) return false
  const rows = await AuditEntry.sequelize!.query(
    `SELECT 1 AS seen FROM audit_entries
     WHERE user_id = ? AND at > ? AND action = 'view' AND entity = ? AND entity_id = ? LIMIT 1`,
    {
      replacements: [actor.userId, new Date(Date.now() - viewWindowMs), input.entity, String(input.entityId)],
      type: QueryTypes.SELECT,
    },
  )
  return rows.length > 0
}

/** Written inside the caller's transaction, so a change and its audit row stand or fall together. */
export async function recordAudit(t: Transaction | null, actor: Actor, input: AuditInput): Promise<void> {
  if (await alreadyViewed(actor, input)) return
  await AuditEntry.create(
    {
      userId: actor.userId,
      action: input.action,
      entity: input.entity,
      entityId: input.entityId == null ? null : String(input.entityId),
      patientId: input.patientId ?? null,
      before: input.before ?? null,
      after: input.after ?? null,
      requestId: actor.requestId,
      ip: actor.ip,
    },
    { transaction: t ?? undefined },
  )
}

/** Only the keys whose values differ, for a readable before/after. */
export function changedFields<T extends object>(before: T, after: T): { before: Partial<T>; after: Partial<T> } {
  const b: Partial<T> = {}
  const a: Partial<T> = {}
  for (const key of Object.keys(after) as (keyof T)[]) {
    if (JSON.stringify(before[key]) !== JSON.stringify(after[key])) {
      b[key] = before[key]
      a[key] = after[key]
    }
  }
  return { before: b, after: a }
}
