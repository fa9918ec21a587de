import type { AuditPage } from '@shared/audit/views'
import { api } from './client'

export interface AuditFilters {
  userId?: number
  patientId?: number
  mrn?: string
  entity?: string
  action?: string
  from?: string
  to?: string
  page?: number
}

export function auditParams(filters: AuditFilters): URLSearchParams {
  const p = new URLSearchParams()
  for (const [k, v] of Object.entries(filters)) if (v !== undefined && v !== null && v !== '') p.set(k, String(v))
  return p
}

export function searchAudit(filters: AuditFilters): Promise<AuditPage> {
  const q = auditParams(filters).toString()
  return api.get<AuditPage>(`/audit${q ? `?${q}` : ''}`)
}

/** The server's CSV of every entry matching the filters (capped by the server), as a download link. */
export function auditCsvUrl(filters: AuditFilters): string {
  const { page: _page, ...rest } = filters
  const p = auditParams(rest)
  p.set('format', 'csv')
  return `/api/audit?${p.toString()}`
}
