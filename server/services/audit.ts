import type { Transaction } from 'sequelize'
import { AuditEntry } from '../models/index'

/** Who is acting, passed from the route to every service that writes. */
export interface Actor {
  userId: number | null
  requestId: string | null
  ip: string | null
}

export interface AuditInput {
  action: string
  entity: string
  entityId?: string | number | null
  patientId?: number | null
  before?: object | null
  after?: object | null
}

/** Written inside the caller's transaction, so a change and its audit row stand or fall together. */
export async function recordAudit(t: Transaction | null, actor: Actor, input: AuditInput): Promise<void> {
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
