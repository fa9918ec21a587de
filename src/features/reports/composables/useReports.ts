import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { keepPreviousData, useQuery } from '@tanstack/vue-query'
import { REPORT_NAMES, type ReportName } from '@shared/reports'
import { useRoute, useRouter, type LocationQueryRaw } from 'vue-router'
import { fetchQualityReport, fetchReport, type ReportFilters } from '@/api/reports'
import { filtersFromQuery } from '@/features/worklist/composables/useWorklistUrl'
import { retryUnlessRefused } from '@/features/episode/composables/useClinic'

export const reportKeys = {
  all: ['reports'] as const,
  detail: (name: ReportName, filters: ReportFilters) => [...reportKeys.all, name, filters] as const,
}

export function useReportQuery(name: MaybeRefOrGetter<ReportName>, filters: MaybeRefOrGetter<ReportFilters>) {
  return useQuery({
    queryKey: computed(() => reportKeys.detail(toValue(name), toValue(filters))),
    queryFn: () => fetchReport(toValue(name), toValue(filters)),
    placeholderData: keepPreviousData,
    retry: retryUnlessRefused,
  })
}

/** Period, surgeon, operation and the open report live in the URL, parsed as the worklist's are. */
export function useReportsUrl() {
  const route = useRoute()
  const router = useRouter()
  const filters = computed<ReportFilters>(() => {
    const f = filtersFromQuery(route.query)
    return { from: f.from, to: f.to, surgeonId: f.surgeonId, procedureCode: f.procedureCode }
  })
  const report = computed<ReportName>(() => {
    const r = route.query.report
    return typeof r === 'string' && (REPORT_NAMES as readonly string[]).includes(r) ? (r as ReportName) : 'funnel'
  })
  function update(changes: Partial<ReportFilters> & { report?: ReportName }): void {
    const next: LocationQueryRaw = { ...route.query }
    for (const [k, v] of Object.entries(changes)) {
      if (v === undefined || v === null || v === '') delete next[k]
      else next[k] = String(v)
    }
    void router.replace({ query: next })
  }
  return { filters, report, update }
}

export function useQualityQuery(filters: MaybeRefOrGetter<ReportFilters>) {
  return useQuery({
    queryKey: computed(() => [...reportKeys.all, 'quality', toValue(filters)] as const),
    queryFn: () => fetchQualityReport(toValue(filters)),
    placeholderData: keepPreviousData,
    retry: retryUnlessRefused,
  })
}
