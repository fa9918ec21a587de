import type { AdministrationInput, DosePlanPreviewInput, PrescriptionInput, ReadinessActionInput, ReviewInput } from '@shared/schemas/clinic'
import { api } from './client'
import type {
  AdministrationView, ClinicReview, DosePlanPreview, PrescriptionView, Projection, ReadinessReview, RecordedAdministration,
} from './clinicTypes'

const base = (id: number) => `/referrals/${id}`

export async function listReviews(id: number): Promise<ClinicReview[]> {
  return (await api.get<{ rows: ClinicReview[] }>(`${base(id)}/reviews`)).rows
}

export function recordReview(id: number, input: ReviewInput): Promise<{ review: ClinicReview; version: number }> {
  return api.post(`${base(id)}/reviews`, input)
}

export function previewDosePlan(id: number, input: DosePlanPreviewInput): Promise<DosePlanPreview> {
  return api.post<DosePlanPreview>(`${base(id)}/dose-plan`, input)
}

export async function listPrescriptions(id: number): Promise<PrescriptionView[]> {
  return (await api.get<{ rows: PrescriptionView[] }>(`${base(id)}/prescriptions`)).rows
}

export function prescribe(id: number, input: PrescriptionInput): Promise<{ prescription: PrescriptionView; version: number }> {
  return api.post(`${base(id)}/prescriptions`, input)
}

export async function listAdministrations(id: number): Promise<AdministrationView[]> {
  return (await api.get<{ rows: AdministrationView[] }>(`${base(id)}/administrations`)).rows
}

export function recordAdministration(id: number, input: AdministrationInput): Promise<RecordedAdministration> {
  return api.post<RecordedAdministration>(`${base(id)}/administrations`, input)
}

export function getProjection(id: number, cardiacOutputLMin?: number | null): Promise<Projection> {
  const q = cardiacOutputLMin ? `?cardiacOutputLMin=${encodeURIComponent(String(cardiacOutputLMin))}` : ''
  return api.get<Projection>(`${base(id)}/projection${q}`)
}

export async function listReadinessReviews(id: number): Promise<ReadinessReview[]> {
  return (await api.get<{ rows: ReadinessReview[] }>(`${base(id)}/readiness`)).rows
}

export function recordReadinessAction(id: number, input: ReadinessActionInput): Promise<Omit<ReadinessReview, 'surgeonId'>> {
  return api.post(`${base(id)}/readiness`, input)
}
