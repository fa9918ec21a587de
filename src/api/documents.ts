import type { UploadKind } from '@shared/schemas/documents'
import type { DocumentList, DocumentView, WrittenLetter } from '@shared/documents/views'
import { api } from './client'

export const listDocuments = (referralId: number) => api.get<DocumentList>(`/referrals/${referralId}/documents`)

export function uploadDocument(referralId: number, input: { kind: UploadKind; title: string; file: File }): Promise<DocumentView> {
  const form = new FormData()
  form.append('kind', input.kind)
  form.append('title', input.title)
  form.append('file', input.file, input.file.name)
  return api.postForm<DocumentView>(`/referrals/${referralId}/documents`, form)
}

export const writeFamilyDoctorLetter = (referralId: number) => api.post<WrittenLetter>(`/referrals/${referralId}/letters`)

/** Plain links: the browser downloads with the session cookie (GET needs no CSRF token). */
export const documentUrl = (id: number) => `/api/documents/${id}`
export const letterUrl = (id: number) => `/api/letters/${id}`
export const fhirExportUrl = (referralId: number) => `/api/referrals/${referralId}/fhir`
