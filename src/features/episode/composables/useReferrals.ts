import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { CreateReferralInput, TransitionInput, UpdateReferralInput } from '@shared/schemas/referrals'
import type { CreateResultInput } from '@shared/schemas/results'
import type { CancelOperationInput } from '@shared/schemas/cancellations'
import { addResult, cancelPlannedOperation, createReferral, getReferral, moveReferral, updateReferral } from '@/api/referrals'
import { fetchWorklist, fetchWorklistCounts, type WorklistCountFilters, type WorklistFilters } from '@/api/worklist'
import type { WorklistCounts } from '@shared/pathway/views'
import type { ReferralDetail, WorklistPage } from '@shared/pathway/views'

/** One key family for episodes: the worklist pages and each episode's detail sit under it. */
export const referralKeys = {
  all: ['referrals'] as const,
  lists: () => [...referralKeys.all, 'list'] as const,
  list: (filters: WorklistFilters) => [...referralKeys.lists(), filters] as const,
  details: () => [...referralKeys.all, 'detail'] as const,
  detail: (id: number) => [...referralKeys.details(), id] as const,
  counts: (filters: WorklistCountFilters) => [...referralKeys.all, 'counts', filters] as const,
}

// Colleagues change the same episodes all day: poll well inside the 15 s the clinic expects.
// Polls are conditional (a 304 when nothing changed) and stop while the tab is hidden; coming
// back to the tab refetches at once.
const WORKLIST_POLL_MS = 8_000
const POLLING = { refetchIntervalInBackground: false, refetchOnWindowFocus: true } as const

/** One page of the worklist; the previous page stays on screen while the next one loads. */
export function useWorklistQuery(filters: MaybeRefOrGetter<WorklistFilters>) {
  const queryClient = useQueryClient()
  return useQuery({
    queryKey: computed(() => referralKeys.list(toValue(filters))),
    queryFn: ({ queryKey }) => fetchWorklist(toValue(filters), queryClient.getQueryData<WorklistPage>(queryKey)),
    placeholderData: keepPreviousData,
    refetchInterval: WORKLIST_POLL_MS,
    ...POLLING,
  })
}

/** The count tiles of a home screen; every tile with the same filters shares this one request. */
export function useWorklistCountsQuery(filters: MaybeRefOrGetter<WorklistCountFilters> = {}) {
  const queryClient = useQueryClient()
  return useQuery({
    queryKey: computed(() => referralKeys.counts(toValue(filters))),
    queryFn: ({ queryKey }) => fetchWorklistCounts(toValue(filters), queryClient.getQueryData<WorklistCounts>(queryKey)),
    refetchInterval: WORKLIST_POLL_MS,
    ...POLLING,
  })
}

export function useReferralQuery(id: MaybeRefOrGetter<number>) {
  // The first read of an episode by this screen is a person opening it (always audited); later
  // reads of the same episode are polls and refetches, marked so the audit counts them once.
  let opened: number | null = null
  const queryClient = useQueryClient()
  return useQuery({
    queryKey: computed(() => referralKeys.detail(toValue(id))),
    queryFn: ({ queryKey }) => {
      const current = toValue(id)
      const refetch = opened === current
      opened = current
      return getReferral(current, { refetch, previous: queryClient.getQueryData<ReferralDetail>(queryKey) })
    },
    // Kept fresh by the episode screen's one poll (useEpisodeUpdates), which writes it here.
    refetchOnWindowFocus: false,
  })
}

/** Any change to an episode can move it between worklist pages, so every list refetches. */
function useInvalidateReferrals() {
  const queryClient = useQueryClient()
  return () => queryClient.invalidateQueries({ queryKey: referralKeys.all })
}

export function useCreateReferralMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({ mutationFn: (input: CreateReferralInput) => createReferral(input), onSuccess: invalidate })
}

export function useMoveReferralMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: TransitionInput }) => moveReferral(id, input),
    // A stale version (409) also means our copy is out of date: refetch either way.
    onSettled: invalidate,
  })
}

export function useAddResultMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: CreateResultInput }) => addResult(id, input),
    onSuccess: invalidate,
  })
}

/** Edits to the episode itself (for instance the antibody screen); the projection under it refetches too. */
export function useUpdateReferralMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: UpdateReferralInput }) => updateReferral(id, input),
    onSettled: invalidate,
  })
}

/** Cancelling the planned operation; a stale version refetches the episode as a move does. */
export function useCancelOperationMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: CancelOperationInput }) => cancelPlannedOperation(id, input),
    onSettled: invalidate,
  })
}
