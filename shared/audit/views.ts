/*
 * The audit trail API's answers (server/services/auditSearch.ts). The server's mapper declares
 * these and the client imports them.
 */

/** One entry of the audit trail; `before` and `after` are the changed fields as stored. */
export interface AuditRow {
  id: number
  at: string
  user: { id: number; name: string } | null
  action: string
  entity: string
  entityId: string | null
  patientId: number | null
  before: Record<string, unknown> | null
  after: Record<string, unknown> | null
  requestId: string | null
}

/** GET /api/audit: one page of entries, newest first. */
export interface AuditPage {
  rows: AuditRow[]
  total: number
  page: number
  pageSize: number
}
