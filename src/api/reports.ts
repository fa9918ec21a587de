import type { Report, ReportName } from '@shared/reports'
import { api } from './client'

export interface ReportFilters { from?: string; to?: string; surgeonId?: number; procedureCode?: string }

function params(filters: ReportFilters): URLSearchParams {
  const p = new URLSearchParams()
  for (const [k, v] of Object.entries(filters)) if (v !== undefined && v !== null && v !== '') p.set(k, String(v))
  return p
}

export function fetchReport(name: ReportName, filters: ReportFilters): Promise<Report> {
  const q = params(filters).toString()
  return api.get<Report>(`/reports/${name}${q ? `?${q}` : ''}`)
}

/** The server's own CSV of one table, for the same filters (a plain link: the browser downloads it). */
export function reportCsvUrl(name: ReportName, table: string, filters: ReportFilters): string {
  const p = params(filters)
  p.set('format', 'csv')
  p.set('table', table)
  return `/api/reports/${name}?${p.toString()}`
}
