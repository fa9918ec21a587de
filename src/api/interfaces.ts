import { api } from './client'
import type { Hl7MessageDetail, Hl7MessagePage, Hl7Outcome, Hl7Overview } from '@shared/hl7/views'

export interface Hl7MessageFilters {
  q?: string
  outcome?: Hl7Outcome
  attention?: boolean
  page?: number
}

export function getHl7Overview(): Promise<Hl7Overview> {
  return api.get<Hl7Overview>('/interfaces/hl7')
}

export function listHl7Messages(f: Hl7MessageFilters): Promise<Hl7MessagePage> {
  const p = new URLSearchParams()
  for (const [k, v] of Object.entries(f)) if (v !== undefined && v !== '') p.set(k, String(v))
  const q = p.toString()
  return api.get<Hl7MessagePage>(`/interfaces/hl7/messages${q ? `?${q}` : ''}`)
}

export function getHl7Message(id: number): Promise<Hl7MessageDetail> {
  return api.get<Hl7MessageDetail>(`/interfaces/hl7/messages/${id}`)
}

export function reprocessHl7Message(id: number): Promise<Hl7MessageDetail> {
  return api.post<Hl7MessageDetail>(`/interfaces/hl7/messages/${id}/reprocess`)
}
