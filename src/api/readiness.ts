import { api } from './client'
import type { ReadinessRow } from '@shared/clinic/views'
import type { Rows } from '@shared/types'

/** What the readiness board can be narrowed by; each key is one query parameter of GET /api/readiness. */
export interface ReadinessFilters {
  from?: string
  to?: string
  procedureCode?: string
  surgeonId?: number
}

export function readinessSearchParams(filters: ReadinessFilters): URLSearchParams {
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(filters)) {
    if (value !== undefined && value !== null && value !== '') params.set(key, String(value))
  }
  return params
}

export async function fetchReadinessBoard(filters: ReadinessFilters): Promise<ReadinessRow[]> {
  const query = readinessSearchParams(filters).toString()
  return (await api.get<Rows<ReadinessRow>>(`/readiness${query ? `?${query}` : ''}`)).rows
}
