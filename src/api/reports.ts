import type { Report, ReportName } from '@shared/reports'
import { api } from './client'

export interface ReportFilters {
  from?: string
  to?: string
  surgeonId?: number
  procedureCode?: string
}

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

export function fetchQualityReport(filters: ReportFilters): Promise<import('@shared/reports/quality').QualityReport> {
  const q = params(filters).toString()
  return api.get(`/reports/quality${q ? `?${q}` : ''}`)
}

/** The measures as CSV, or the national-audit rows (doctors and surgeons), for the same filters. */
export function qualityCsvUrl(filters: ReportFilters, which: 'measures' | 'national-audit'): string {
  const p = params(filters)
  if (which === 'measures') p.set('format', 'csv')
  return `/api/reports/quality${which === 'national-audit' ? '/national-audit' : ''}?${p.toString()}`
}
