import type { Analyte } from '../pathway/analytes'

/** The five things every laboratory row must say, and the CSV header that holds each. */
export const MAPPED_FIELDS = ['mrn', 'code', 'value', 'unit', 'takenAt'] as const
export type MappedField = (typeof MAPPED_FIELDS)[number]

export const MAPPED_FIELD_LABELS: Record<MappedField, string> = {
  mrn: 'MRN (hospital number)',
  code: 'Test code or LOINC',
  value: 'Value',
  unit: 'Unit',
  takenAt: 'Time taken',
}

export const DELIMITERS = [',', ';', '\t'] as const
export type Delimiter = (typeof DELIMITERS)[number]

/**
 * How dates without an ISO 8601 form are read: day first (31/01/2026 09:30, as UK laboratories
 * print them) or ISO only. Times without an offset are the clinic's wall-clock time.
 */
export const DATE_ORDERS = ['iso', 'dmy'] as const
export type DateOrder = (typeof DATE_ORDERS)[number]

export interface ColumnMapping {
  columns: Record<MappedField, string>
  delimiter: Delimiter
  dateOrder: DateOrder
  /** The source's own test codes (e.g. "FERR2" → ferritin), added to the common ones. */
  codes: Record<string, Analyte>
}

export const DEFAULT_MAPPING: ColumnMapping = {
  columns: { mrn: 'mrn', code: 'test_code', value: 'value', unit: 'unit', takenAt: 'taken_at' },
  delimiter: ',',
  dateOrder: 'iso',
  codes: {},
}

/** Upload size limit, stated on screen and enforced by the server (multer). */
export const MAX_CSV_BYTES = 20 * 1024 * 1024
export const MAX_FHIR_BYTES = 20 * 1024 * 1024
