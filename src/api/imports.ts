import type { ColumnMapping } from '@shared/imports/mapping'
import type { SkipCode, SkippedRow } from '@shared/imports/reasons'
import { api } from './client'

/** As server/services/imports/run.ts returns them. */
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
  kind: 'lab-csv' | 'fhir'
  committed: boolean
  rowsRead: number
  accepted: number
  skipped: SkippedRow[]
  skippedTotal: number
  skipCounts: Partial<Record<SkipCode, number>>
  acceptedRows: AcceptedRowView[]
  listCap: number
  referralsAffected: number
  derived: number
  derivationsRefused: number
  sameFileAs: { batchId: number; createdAt: string } | null
}

/** As server/services/imports/batches.ts returns it. */
export interface BatchView {
  id: number
  kind: 'lab-csv' | 'fhir'
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

export interface MappingView { sourceName: string; mapping: ColumnMapping; saved: boolean; updatedAt: string | null }

/** As server/services/imports/fhir.ts returns it. */
export interface FhirEntryResult { index: number; fullUrl?: string; outcome: 'accepted' | 'skipped' | 'invalid'; reason?: string }
export interface FhirImportResult {
  batchId?: number
  committed: boolean
  entries: FhirEntryResult[]
  accepted: number
  skipped: number
  invalid: number
  referralsAffected: number
  sameFileAs: { batchId: number; createdAt: string } | null
  notStored?: string
}

export interface LabUpload { file: File; source: string; mapping: ColumnMapping; commit: boolean }

export function uploadLabResults(input: LabUpload): Promise<ImportSummary> {
  const form = new FormData()
  form.append('commit', String(input.commit))
  form.append('source', input.source)
  form.append('mapping', JSON.stringify(input.mapping))
  form.append('file', input.file, input.file.name)
  return api.postForm<ImportSummary>('/imports/lab-results', form)
}

export interface FhirUpload { file: File; commit: boolean; storeValid: boolean }

export function uploadFhirBundle(input: FhirUpload): Promise<FhirImportResult> {
  const form = new FormData()
  form.append('file', input.file, input.file.name)
  const q = new URLSearchParams({ commit: String(input.commit), storeValid: String(input.storeValid) })
  return api.postForm<FhirImportResult>(`/imports/fhir?${q}`, form)
}

const source = (name: string) => encodeURIComponent(name)
export const listMappings = () => api.get<{ rows: MappingView[] }>('/imports/mappings')
export const getMapping = (name: string) => api.get<MappingView>(`/imports/mappings/${source(name)}`)
export const saveMapping = (name: string, mapping: ColumnMapping) => api.put<MappingView>(`/imports/mappings/${source(name)}`, { mapping })

export const listBatches = () => api.get<{ rows: BatchView[] }>('/imports')
export const reverseBatch = (id: number, reason: string) => api.post<BatchView>(`/imports/${id}/reversal`, { reason })
