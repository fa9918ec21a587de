import type { ReportTable } from '../../../shared/reports'

/** RFC 4180: quote a field when it holds a comma, quote or line break; double inner quotes. */
function field(v: unknown): string {
  if (v == null) return ''
  const s = String(v)
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
}

export function tableToCsv(table: ReportTable): string {
  const lines = [table.columns.map((c) => field(c.key)).join(',')]
  for (const row of table.rows) lines.push(table.columns.map((c) => field(row[c.key])).join(','))
  return lines.join('\r\n') + '\r\n'
}

export function rowsToCsv(columns: string[], rows: Record<string, unknown>[]): string {
  const lines = [columns.map(field).join(',')]
  for (const row of rows) lines.push(columns.map((c) => field(typeof row[c] === 'object' && row[c] !== null ? JSON.stringify(row[c]) : row[c])).join(','))
  return lines.join('\r\n') + '\r\n'
}
