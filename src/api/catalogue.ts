import type { CreateProcedureInput, UpdateProcedureInput } from '@shared/schemas/procedures'
import type { Rows } from '@shared/types'
import { api } from './client'
import type { ProcedureView } from '@shared/pathway/views'

/** The whole operations catalogue, retired operations included (the admin page). */
export async function listAllProcedures(): Promise<ProcedureView[]> {
  return (await api.get<Rows<ProcedureView>>('/procedures?includeInactive=1')).rows
}

export function createProcedure(input: CreateProcedureInput): Promise<ProcedureView> {
  return api.post<ProcedureView>('/procedures', input)
}

export function updateProcedure(code: string, changes: UpdateProcedureInput): Promise<ProcedureView> {
  return api.patch<ProcedureView>(`/procedures/${encodeURIComponent(code)}`, changes)
}
