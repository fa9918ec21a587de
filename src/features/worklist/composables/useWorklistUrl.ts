import { computed } from 'vue'
import { useRoute, useRouter, type LocationQuery, type LocationQueryRaw } from 'vue-router'
import { isStage, isWorklistFlag, PRIORITIES, type Priority } from '@shared/pathway'
import { WORKLIST_SORTS, type WorklistSort } from '@shared/schemas/referrals'
import { worklistSearchParams, type WorklistFilters } from '@/api/worklist'

export const WORKLIST_PAGE_SIZE = 25

function one(query: LocationQuery, key: string): string | undefined {
  const v = query[key]
  const s = Array.isArray(v) ? v[0] : v
  return typeof s === 'string' && s.trim() !== '' ? s.trim() : undefined
}

function many(query: LocationQuery, key: string): string[] {
  return (one(query, key) ?? '')
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean)
}

const isPriority = (v: string): v is Priority => (PRIORITIES as readonly string[]).includes(v)
const isSort = (v: string): v is WorklistSort => (WORKLIST_SORTS as readonly string[]).includes(v)
const positiveInt = (v: string | undefined) => (v && /^\d+$/.test(v) && Number(v) > 0 ? Number(v) : undefined)
const isoDate = (v: string | undefined) => (v && /^\d{4}-\d{2}-\d{2}$/.test(v) ? v : undefined)

/**
 * Reads worklist filters from a URL query. Anything a hand-edited or old link gets wrong is
 * dropped rather than sent, so a bookmark never turns into an error page.
 */
export function filtersFromQuery(query: LocationQuery): WorklistFilters {
  const sort = one(query, 'sort')
  return {
    stage: many(query, 'stage').filter(isStage),
    flag: many(query, 'flag').filter(isWorklistFlag),
    priority: many(query, 'priority').filter(isPriority),
    surgeonId: positiveInt(one(query, 'surgeonId')),
    procedureCode: one(query, 'procedureCode')?.toUpperCase(),
    from: isoDate(one(query, 'from')),
    to: isoDate(one(query, 'to')),
    q: one(query, 'q'),
    sort: sort && isSort(sort) ? sort : undefined,
    page: positiveInt(one(query, 'page')),
  }
}

export function queryFromFilters(filters: WorklistFilters): LocationQueryRaw {
  const out: LocationQueryRaw = {}
  worklistSearchParams(filters).forEach((value, key) => {
    // Page 1 and the default sort are the plain worklist: keep the shared link short.
    if ((key === 'page' && value === '1') || (key === 'sort' && value === 'plannedSurgeryDate')) return
    out[key] = value
  })
  return out
}

/** The worklist's filters live in the URL, so a view can be bookmarked and sent to a colleague. */
export function useWorklistUrl() {
  const route = useRoute()
  const router = useRouter()

  const filters = computed<WorklistFilters>(() => filtersFromQuery(route.query))
  const request = computed<WorklistFilters>(() => ({ ...filters.value, page: filters.value.page ?? 1, pageSize: WORKLIST_PAGE_SIZE }))

  /** Replaces (not pushes) history: each keystroke in search is not a Back step. */
  function update(changes: Partial<WorklistFilters>, opts: { keepPage?: boolean } = {}): void {
    const next = { ...filters.value, ...changes }
    // A new filter changes what "page 3" means, so it starts again from the first page.
    if (!opts.keepPage) next.page = undefined
    void router.replace({ query: queryFromFilters(next) })
  }

  function clear(): void {
    void router.replace({ query: {} })
  }

  return { filters, request, update, clear }
}
