import type { Priority, Stage, WorklistFlag } from '@shared/pathway'
import type { WorklistSort } from '@shared/schemas/referrals'
import { api } from './client'
import type { WorklistPage } from './pathwayTypes'

/** What the worklist can be narrowed by; every key maps to one query parameter of GET /api/worklist. */
export interface WorklistFilters {
  stage?: Stage[]
  flag?: WorklistFlag[]
  priority?: Priority[]
  surgeonId?: number
  procedureCode?: string
  from?: string
  to?: string
  q?: string
  sort?: WorklistSort
  page?: number
  pageSize?: number
}

/** The filters as a query string: lists comma-joined, empty values left out. */
export function worklistSearchParams(filters: WorklistFilters): URLSearchParams {
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(filters)) {
    if (value === undefined || value === null || value === '') continue
    if (Array.isArray(value)) {
      if (value.length) params.set(key, value.join(','))
    } else params.set(key, String(value))
  }
  return params
}

export function fetchWorklist(filters: WorklistFilters): Promise<WorklistPage> {
  const query = worklistSearchParams(filters).toString()
  return api.get<WorklistPage>(`/worklist${query ? `?${query}` : ''}`)
}
