import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { CreatePatientInput } from '@shared/schemas/patients'
import { createPatient, searchPatients } from '@/api/patients'

export const patientKeys = {
  all: ['patients'] as const,
  search: (q: string) => [...patientKeys.all, 'search', q] as const,
}

/** The server wants at least two characters before it searches. */
export const MIN_SEARCH_LENGTH = 2

export function usePatientSearchQuery(q: MaybeRefOrGetter<string>) {
  const term = computed(() => toValue(q).trim())
  return useQuery({
    queryKey: computed(() => patientKeys.search(term.value)),
    queryFn: () => searchPatients(term.value),
    enabled: computed(() => term.value.length >= MIN_SEARCH_LENGTH),
    placeholderData: keepPreviousData,
  })
}

export function useCreatePatientMutation() {
  const queryClient = useQueryClient()
  return useMutation({
    mutationFn: (input: CreatePatientInput) => createPatient(input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: patientKeys.all }),
  })
}
