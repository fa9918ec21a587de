import { computed } from 'vue'
import { useRoute, useRouter, type LocationQueryRaw } from 'vue-router'
import type { ReadinessFilters } from '@/api/readiness'
import { filtersFromQuery } from '@/features/worklist/composables/useWorklistUrl'

/**
 * The readiness board's filters live in the URL like the worklist's (same parsing, so a bad
 * hand-edited value is dropped, never sent). No dates means the server's next 8 weeks.
 */
export function useReadinessUrl() {
  const route = useRoute()
  const router = useRouter()

  const filters = computed<ReadinessFilters>(() => {
    const f = filtersFromQuery(route.query)
    return { from: f.from, to: f.to, procedureCode: f.procedureCode, surgeonId: f.surgeonId }
  })

  function update(changes: Partial<ReadinessFilters>): void {
    const next: LocationQueryRaw = { ...route.query }
    for (const [k, v] of Object.entries(changes)) {
      if (v === undefined || v === null || v === '') delete next[k]
      else next[k] = String(v)
    }
    void router.replace({ query: next })
  }

  function clear(): void {
    const next: LocationQueryRaw = { ...route.query }
    for (const k of ['from', 'to', 'procedureCode', 'surgeonId']) delete next[k]
    void router.replace({ query: next })
  }

  return { filters, update, clear }
}
