import type { CreatePatientInput } from '@shared/schemas/patients'
import { api } from './client'
import type { PatientSummary } from './pathwayTypes'

export async function searchPatients(q: string): Promise<PatientSummary[]> {
  const { rows } = await api.get<{ rows: PatientSummary[] }>(`/patients?q=${encodeURIComponent(q)}`)
  return rows
}

export function createPatient(input: CreatePatientInput): Promise<PatientSummary> {
  return api.post<PatientSummary>('/patients', input)
}
