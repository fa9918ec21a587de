import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { keepPreviousData, useQuery } from '@tanstack/vue-query'
import { useRoute, useRouter, type LocationQuery, type LocationQueryRaw } from 'vue-router'
import { searchAudit, type AuditFilters } from '@/api/audit'
import { retryUnlessRefused } from '@/features/episode/composables/useClinic'

export const auditKeys = {
  all: ['audit'] as const,
  page: (filters: AuditFilters) => [...auditKeys.all, filters] as const,
}

export function useAuditQuery(filters: MaybeRefOrGetter<AuditFilters>) {
  return useQuery({
    queryKey: computed(() => auditKeys.page(toValue(filters))),
    queryFn: () => searchAudit(toValue(filters)),
    placeholderData: keepPreviousData,
    retry: retryUnlessRefused,
  })
}

const one = (q: LocationQuery, k: string) => (typeof q[k] === 'string' && q[k] !== '' ? (q[k] as string) : undefined)
const id = (v: string | undefined) => (v && /^\d+$/.test(v) && Number(v) > 0 ? Number(v) : undefined)
const date = (v: string | undefined) => (v && /^\d{4}-\d{2}-\d{2}$/.test(v) ? v : undefined)

/** The search lives in the address; a hand-edited bad value is dropped, never sent. */
export function useAuditUrl() {
  const route = useRoute()
  const router = useRouter()
  const filters = computed<AuditFilters>(() => {
    const q = route.query
    return {
      userId: id(one(q, 'userId')),
      patientId: id(one(q, 'patientId')),
      mrn: one(q, 'mrn')?.slice(0, 40),
      entity: one(q, 'entity'),
      action: one(q, 'action'),
      from: date(one(q, 'from')),
      to: date(one(q, 'to')),
      page: id(one(q, 'page')),
    }
  })
  function update(changes: Partial<AuditFilters>): void {
    const next: LocationQueryRaw = { ...route.query }
    // Any change of search starts again from the first page.
    if (!('page' in changes)) delete next.page
    for (const [k, v] of Object.entries(changes)) {
      if (v === undefined || v === null || v === '' || (k === 'page' && v === 1)) delete next[k]
      else next[k] = String(v)
    }
    void router.replace({ query: next })
  }
  return { filters, update }
}
