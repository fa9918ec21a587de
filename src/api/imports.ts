import type { ColumnMapping } from '@shared/imports/mapping'
import type { Rows } from '@shared/types'
import type { BatchView, FhirImportResult, ImportSummary, MappingView } from '@shared/imports/views'
import { api } from './client'

export interface LabUpload {
  file: File
  source: string
  mapping: ColumnMapping
  commit: boolean
}

export function uploadLabResults(input: LabUpload): Promise<ImportSummary> {
  const form = new FormData()
  form.append('commit', String(input.commit))
  form.append('source', input.source)
  form.append('mapping', JSON.stringify(input.mapping))
  form.append('file', input.file, input.file.name)
  return api.postForm<ImportSummary>('/imports/lab-results', form)
}

export interface FhirUpload {
  file: File
  commit: boolean
  storeValid: boolean
}

export function uploadFhirBundle(input: FhirUpload): Promise<FhirImportResult> {
  const form = new FormData()
  form.append('file', input.file, input.file.name)
  const q = new URLSearchParams({ commit: String(input.commit), storeValid: String(input.storeValid) })
  return api.postForm<FhirImportResult>(`/imports/fhir?${q}`, form)
}

const source = (name: string) => encodeURIComponent(name)
export const listMappings = () => api.get<Rows<MappingView>>('/imports/mappings')
export const getMapping = (name: string) => api.get<MappingView>(`/imports/mappings/${source(name)}`)
export const saveMapping = (name: string, mapping: ColumnMapping) => api.put<MappingView>(`/imports/mappings/${source(name)}`, { mapping })

export const listBatches = () => api.get<Rows<BatchView>>('/imports')
export const reverseBatch = (id: number, reason: string) => api.post<BatchView>(`/imports/${id}/reversal`, { reason })
