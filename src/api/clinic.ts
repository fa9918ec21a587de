import type {
  AdministrationInput,
  DosePlanPreviewInput,
  PrescriptionInput,
  ReadinessActionInput,
  ReviewInput,
} from '@shared/schemas/clinic'
import type { Projection } from '@shared/clinic/projection'
import type {
  AdministrationView,
  ClinicReviewView,
  DosePlanPreview,
  PrescriptionView,
  ReadinessAnswer,
  ReadinessReviewView,
  RecordedAdministration,
  RecordedPrescription,
  RecordedReview,
} from '@shared/clinic/views'
import type { Rows } from '@shared/types'
import { api } from './client'

const base = (id: number) => `/referrals/${id}`

export async function listReviews(id: number): Promise<ClinicReviewView[]> {
  return (await api.get<Rows<ClinicReviewView>>(`${base(id)}/reviews`)).rows
}

export function recordReview(id: number, input: ReviewInput): Promise<RecordedReview> {
  return api.post(`${base(id)}/reviews`, input)
}

export function previewDosePlan(id: number, input: DosePlanPreviewInput): Promise<DosePlanPreview> {
  return api.post<DosePlanPreview>(`${base(id)}/dose-plan`, input)
}

export async function listPrescriptions(id: number): Promise<PrescriptionView[]> {
  return (await api.get<Rows<PrescriptionView>>(`${base(id)}/prescriptions`)).rows
}

export function prescribe(id: number, input: PrescriptionInput): Promise<RecordedPrescription> {
  return api.post(`${base(id)}/prescriptions`, input)
}

export async function listAdministrations(id: number): Promise<AdministrationView[]> {
  return (await api.get<Rows<AdministrationView>>(`${base(id)}/administrations`)).rows
}

export function recordAdministration(id: number, input: AdministrationInput): Promise<RecordedAdministration> {
  return api.post<RecordedAdministration>(`${base(id)}/administrations`, input)
}

export function getProjection(id: number, cardiacOutputLMin?: number | null): Promise<Projection> {
  const q = cardiacOutputLMin ? `?cardiacOutputLMin=${encodeURIComponent(String(cardiacOutputLMin))}` : ''
  return api.get<Projection>(`${base(id)}/projection${q}`)
}

export async function listReadinessReviews(id: number): Promise<ReadinessReviewView[]> {
  return (await api.get<Rows<ReadinessReviewView>>(`${base(id)}/readiness`)).rows
}

export function recordReadinessAction(id: number, input: ReadinessActionInput): Promise<ReadinessAnswer> {
  return api.post(`${base(id)}/readiness`, input)
}
