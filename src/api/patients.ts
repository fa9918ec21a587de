import type { CreatePatientInput } from '@shared/schemas/patients'
import type { Rows } from '@shared/types'
import { api } from './client'
import type { PatientSummary, PatientView } from '@shared/pathway/views'

export async function searchPatients(q: string): Promise<PatientSummary[]> {
  const { rows } = await api.get<Rows<PatientSummary>>(`/patients?q=${encodeURIComponent(q)}`)
  return rows
}

export function createPatient(input: CreatePatientInput): Promise<PatientView> {
  return api.post<PatientView>('/patients', input)
}
