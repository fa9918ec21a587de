/** The service's reports. Names are stable API values. */
export const REPORT_NAMES = ['funnel', 'haemoglobin', 'transfusion', 'waiting-times', 'blood-ordering'] as const
export type ReportName = (typeof REPORT_NAMES)[number]

export function isReportName(v: unknown): v is ReportName {
  return typeof v === 'string' && (REPORT_NAMES as readonly string[]).includes(v)
}

/** Every figure says what was counted, out of what, over which period. */
export interface Definition {
  numerator: string
  denominator: string
  period: string
}

export interface ReportColumn {
  key: string
  label: string
}
export interface ReportTable {
  columns: ReportColumn[]
  rows: Record<string, string | number | boolean | null | Definition>[]
  /** Keyed by column (or by row key for the funnel). */
  definitions: Record<string, Definition>
}

export interface Report {
  report: ReportName
  period: { from: string; to: string; basis: string }
  filters: { surgeonId: number | null; procedureCode: string | null }
  tables: Record<string, ReportTable>
}

/** Which date puts an episode in a report's period; stated on every report. */
export const PERIOD_BASIS = {
  referral: 'Episodes referred (referral created) from the start to the end date, inclusive',
  surgery: 'Episodes with a post-operative record whose actual surgery date is from the start to the end date, inclusive',
} as const
