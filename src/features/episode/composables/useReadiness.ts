import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { ReadinessActionInput } from '@shared/schemas/clinic'
import { getProjection, listReadinessReviews, recordReadinessAction } from '@/api/clinic'
import { fetchReadinessBoard, type ReadinessFilters } from '@/api/readiness'
import { referralKeys } from './useReferrals'
import { retryUnlessRefused } from './useClinic'

/** The board sits under the referral family: any episode change can change its verdicts. */
export const readinessKeys = {
  board: (filters: ReadinessFilters) => [...referralKeys.all, 'readiness-board', filters] as const,
  projection: (id: number, cardiacOutputLMin: number | null) => [...referralKeys.detail(id), 'projection', cardiacOutputLMin] as const,
  reviews: (id: number) => [...referralKeys.detail(id), 'readiness'] as const,
}

// Verdicts move when a colleague enters a result; the board is not watched as closely as the worklist.
const BOARD_POLL_MS = 30_000

export function useReadinessBoardQuery(filters: MaybeRefOrGetter<ReadinessFilters>) {
  return useQuery({
    queryKey: computed(() => readinessKeys.board(toValue(filters))),
    queryFn: () => fetchReadinessBoard(toValue(filters)),
    placeholderData: keepPreviousData,
    refetchInterval: BOARD_POLL_MS,
  })
}

/** The surgery-day projection; a 422 (something missing) is an answer, not a failure to retry. */
export function useProjectionQuery(id: MaybeRefOrGetter<number>, cardiacOutputLMin: MaybeRefOrGetter<number | null>) {
  return useQuery({
    queryKey: computed(() => readinessKeys.projection(toValue(id), toValue(cardiacOutputLMin))),
    queryFn: () => getProjection(toValue(id), toValue(cardiacOutputLMin)),
    placeholderData: keepPreviousData,
    retry: retryUnlessRefused,
  })
}

export function useReadinessReviewsQuery(id: MaybeRefOrGetter<number>) {
  return useQuery({ queryKey: computed(() => readinessKeys.reviews(toValue(id))), queryFn: () => listReadinessReviews(toValue(id)) })
}

export function useReadinessActionMutation() {
  const queryClient = useQueryClient()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: ReadinessActionInput }) => recordReadinessAction(id, input),
    // A date-change request raises a flag on the episode and the lists: refetch them all.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: referralKeys.all }),
  })
}
