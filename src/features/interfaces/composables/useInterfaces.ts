import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import { getHl7Message, getHl7Overview, listHl7Messages, reprocessHl7Message, type Hl7MessageFilters } from '@/api/interfaces'
import { retryUnlessRefused } from '@/features/episode/composables/useClinic'

// Messages arrive by themselves; the screen follows them without a reload.
const POLL_MS = 5000

export const interfaceKeys = {
  all: ['interfaces'] as const,
  overview: () => [...interfaceKeys.all, 'overview'] as const,
  messages: (f: Hl7MessageFilters) => [...interfaceKeys.all, 'messages', f] as const,
  message: (id: number) => [...interfaceKeys.all, 'message', id] as const,
}

export function useHl7OverviewQuery() {
  return useQuery({ queryKey: interfaceKeys.overview(), queryFn: getHl7Overview, refetchInterval: POLL_MS, retry: retryUnlessRefused })
}

export function useHl7MessagesQuery(filters: MaybeRefOrGetter<Hl7MessageFilters>) {
  return useQuery({
    queryKey: computed(() => interfaceKeys.messages(toValue(filters))),
    queryFn: () => listHl7Messages(toValue(filters)),
    placeholderData: keepPreviousData,
    refetchInterval: POLL_MS,
    retry: retryUnlessRefused,
  })
}

export function useHl7MessageQuery(id: MaybeRefOrGetter<number | null>) {
  return useQuery({
    queryKey: computed(() => interfaceKeys.message(toValue(id) ?? 0)),
    queryFn: () => getHl7Message(toValue(id)!),
    enabled: computed(() => toValue(id) != null),
    retry: retryUnlessRefused,
  })
}

export function useReprocessMutation() {
  const qc = useQueryClient()
  return useMutation({
    mutationFn: reprocessHl7Message,
    onSuccess: () => qc.invalidateQueries({ queryKey: interfaceKeys.all }),
  })
}
