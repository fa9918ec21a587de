import type { Rows } from '@shared/types'
import type { CreateIronProductInput, UpdateIronProductInput } from '@shared/schemas/formulary'
import type { DosingTableInput } from '@shared/schemas/dosingTable'
import { api } from './client'
import type { FormularyEntry } from '@shared/formulary/views'

export async function listFormulary(includeInactive = false): Promise<FormularyEntry[]> {
  return (await api.get<Rows<FormularyEntry>>(`/formulary${includeInactive ? '?includeInactive=1' : ''}`)).rows
}

export function createIronProduct(input: CreateIronProductInput): Promise<FormularyEntry> {
  return api.post<FormularyEntry>('/formulary', input)
}

export function updateIronProduct(code: string, changes: UpdateIronProductInput): Promise<FormularyEntry> {
  return api.patch<FormularyEntry>(`/formulary/${encodeURIComponent(code)}`, changes)
}

export function saveDosingTable(code: string, input: DosingTableInput): Promise<FormularyEntry> {
  return api.put<FormularyEntry>(`/formulary/${encodeURIComponent(code)}/dosing-table`, input)
}
