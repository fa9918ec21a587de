/** Why an imported row or entry was not stored. Codes are API values; labels are for people. */
export const SKIP_CODES = [
  'unknown-mrn',
  'no-open-referral',
  'unknown-analyte',
  'unknown-unit',
  'implausible-value',
  'bad-date',
  'duplicate-stored',
  'duplicate-in-file',
  'bad-row',
] as const
export type SkipCode = (typeof SKIP_CODES)[number]

export const SKIP_LABELS: Record<SkipCode, string> = {
  'unknown-mrn': 'Unknown MRN',
  'no-open-referral': 'No open episode',
  'unknown-analyte': 'Unknown test',
  'unknown-unit': 'Unit not accepted',
  'implausible-value': 'Value not plausible',
  'bad-date': 'Time taken unreadable',
  'duplicate-stored': 'Already stored',
  'duplicate-in-file': 'Repeated in this file',
  'bad-row': 'Row unreadable',
}

export interface SkippedRow {
  row: number
  code: SkipCode
  reason: string
}

/** Rows or entries listed in one response at most; the totals always count them all. */
export const LIST_CAP = 1000
