import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { FollowUpInput, OutcomeInput } from '@shared/schemas/outcomes'
import { isApiError } from '@/api/client'
import { getOutcome, recordFollowUp, recordOutcome } from '@/api/outcomes'
import { referralKeys } from './useReferrals'
import { retryUnlessRefused } from './useClinic'

/** Under the episode's key, so a move or any episode write refetches the record too. */
export const outcomeKeys = {
  detail: (id: number) => [...referralKeys.detail(id), 'outcome'] as const,
}

/** The post-operative record, or null while none is recorded (the server answers 404). */
export function useOutcomeQuery(id: MaybeRefOrGetter<number>, enabled: MaybeRefOrGetter<boolean> = true) {
  return useQuery({
    queryKey: computed(() => outcomeKeys.detail(toValue(id))),
    queryFn: async () => {
      try {
        return await getOutcome(toValue(id))
      } catch (e) {
        if (isApiError(e) && e.status === 404 && e.code === 'not_found') return null
        throw e
      }
    },
    enabled: computed(() => toValue(enabled)),
    retry: retryUnlessRefused,
  })
}

function useInvalidateReferrals() {
  const queryClient = useQueryClient()
  return () => queryClient.invalidateQueries({ queryKey: referralKeys.all })
}

export function useRecordOutcomeMutation() {
  const invalidate = useInvalidateReferrals()
  // A 409 means our version is stale: refetch either way.
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: OutcomeInput }) => recordOutcome(id, input),
    onSettled: invalidate,
  })
}

export function useRecordFollowUpMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: FollowUpInput }) => recordFollowUp(id, input),
    onSettled: invalidate,
  })
}
