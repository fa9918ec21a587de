import type { CreateProcedureInput, UpdateProcedureInput } from '@shared/schemas/procedures'
import { api } from './client'
import type { Procedure } from './pathwayTypes'

/** The whole operations catalogue, retired operations included (the admin page). */
export async function listAllProcedures(): Promise<Procedure[]> {
  return (await api.get<{ rows: Procedure[] }>('/procedures?includeInactive=1')).rows
}

export function createProcedure(input: CreateProcedureInput): Promise<Procedure> {
  return api.post<Procedure>('/procedures', input)
}

export function updateProcedure(code: string, changes: UpdateProcedureInput): Promise<Procedure> {
  return api.patch<Procedure>(`/procedures/${encodeURIComponent(code)}`, changes)
}
