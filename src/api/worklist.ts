import type { Priority, Stage, WorklistFlag } from '@shared/pathway'
import type { WorklistSort } from '@shared/schemas/referrals'
import { api } from './client'
import type { WorklistPage } from '@shared/pathway/views'
import type { WorklistCounts } from '@shared/pathway/views'

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

/** `previous`: the page on screen, so a poll that finds nothing new is a 304 with no body. */
export function fetchWorklist(filters: WorklistFilters, previous?: WorklistPage): Promise<WorklistPage> {
  const query = worklistSearchParams(filters).toString()
  return api.poll<WorklistPage>(`/worklist${query ? `?${query}` : ''}`, previous)
}

/** What the count tiles narrow by: the worklist's filters, without sorting or paging. */
export type WorklistCountFilters = Omit<WorklistFilters, 'sort' | 'page' | 'pageSize'>

/** Every count tile of a home screen in one request (GET /api/worklist/counts). */
export function fetchWorklistCounts(filters: WorklistCountFilters, previous?: WorklistCounts): Promise<WorklistCounts> {
  const query = worklistSearchParams(filters).toString()
  return api.poll<WorklistCounts>(`/worklist/counts${query ? `?${query}` : ''}`, previous)
}
