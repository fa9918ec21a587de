import type { DocumentKind, UploadKind } from '@shared/schemas/documents'
import { api } from './client'

/** As server/services/documents/index.ts returns it. */
export interface DocumentView {
  id: number
  referralId: number
  kind: DocumentKind
  kindLabel: string
  title: string
  originalName: string
  mediaType: string
  sizeBytes: number
  sha256: string
  uploadedBy: { id: number; name: string } | null
  uploadedAt: string
  /** Set when the document is a letter the clinic wrote. */
  letterId: number | null
}

export const listDocuments = (referralId: number) => api.get<{ rows: DocumentView[]; readOnly: boolean }>(`/referrals/${referralId}/documents`)

export function uploadDocument(referralId: number, input: { kind: UploadKind; title: string; file: File }): Promise<DocumentView> {
  const form = new FormData()
  form.append('kind', input.kind)
  form.append('title', input.title)
  form.append('file', input.file, input.file.name)
  return api.postForm<DocumentView>(`/referrals/${referralId}/documents`, form)
}

export const writeFamilyDoctorLetter = (referralId: number) => api.post<{ id: number; documentId: number }>(`/referrals/${referralId}/letters`)

/** Plain links: the browser downloads with the session cookie (GET needs no CSRF token). */
export const documentUrl = (id: number) => `/api/documents/${id}`
export const letterUrl = (id: number) => `/api/letters/${id}`
export const fhirExportUrl = (referralId: number) => `/api/referrals/${referralId}/fhir`
