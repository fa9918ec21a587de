import type { ReportTable } from '../../../shared/reports'
import { toCsv } from '../../../shared/csv'

/** Every CSV download goes through shared/csv.ts, which neutralises formula-like cells. */
export function tableToCsv(table: ReportTable): string {
  return toCsv(
    table.columns.map((c) => c.key),
    table.rows as Record<string, unknown>[],
  )
}

export function rowsToCsv(columns: string[], rows: Record<string, unknown>[]): string {
  return toCsv(columns, rows)
}
