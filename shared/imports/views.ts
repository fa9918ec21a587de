import type { ColumnMapping } from './mapping'
import type { SkipCode, SkippedRow } from './reasons'

/** What the import API answers; the server builds these and the client reads them. */

export type ImportKind = 'lab-csv' | 'fhir'

export interface AcceptedRowView {
  row: number
  mrn: string
  patient: string
  referralId: number
  analyte: string
  analyteLabel: string
  value: number
  unit: string
  valueCanonical: number
  unitCanonical: string
  takenAt: string
}

export interface ImportSummary {
  batchId?: number
  kind: ImportKind
  committed: boolean
  rowsRead: number
  accepted: number
  /** The first LIST_CAP skipped rows, in file order; skippedTotal counts them all. */
  skipped: SkippedRow[]
  skippedTotal: number
  skipCounts: Partial<Record<SkipCode, number>>
  /** The first LIST_CAP accepted rows, for review before committing. */
  acceptedRows: AcceptedRowView[]
  listCap: number
  referralsAffected: number
  derived: number
  derivationsRefused: number
  /** An earlier, unreversed batch of exactly the same file (by SHA-256). */
  sameFileAs: { batchId: number; createdAt: string } | null
}

export interface BatchView {
  id: number
  kind: ImportKind
  sourceName: string
  fileName: string
  sha256: string
  createdAt: string
  createdBy: { id: number; name: string } | null
  rowsRead: number
  accepted: number
  skipped: number
  derived: number
  referralsAffected: number
  skipCounts: Partial<Record<SkipCode, number>>
  reversedAt: string | null
  reversedBy: { id: number; name: string } | null
  reversalReason: string | null
  resultsRemoved: number | null
}

export interface MappingView {
  sourceName: string
  mapping: ColumnMapping
  saved: boolean
  updatedAt: string | null
}

export type EntryOutcome = 'accepted' | 'skipped' | 'invalid'
export interface FhirEntryResult {
  index: number
  fullUrl?: string
  outcome: EntryOutcome
  reason?: string
}

export interface FhirImportResult {
  batchId?: number
  committed: boolean
  entries: FhirEntryResult[]
  accepted: number
  skipped: number
  invalid: number
  referralsAffected: number
  sameFileAs: ImportSummary['sameFileAs']
  /** Why a commit stored nothing, when it did not. */
  notStored?: string
}
