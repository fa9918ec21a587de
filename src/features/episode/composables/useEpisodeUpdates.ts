import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { useQuery, useQueryClient, type QueryKey } from '@tanstack/vue-query'
import { getEpisodeUpdates } from '@/api/referrals'
import type { EpisodeUpdates } from '@shared/pathway/views'
import { referralKeys } from './useReferrals'
import { appointmentKeys } from './useAppointments'

export const episodeUpdateKeys = {
  of: (referralId: number) => ['episode-updates', referralId] as const,
}

// Patients answer from their e-mail and the worker sends in the background: the shortest of the
// three polls this one replaces (detail 12 s, appointments 10 s, messages 8 s).
const POLL_MS = 8_000

/**
 * The open episode's one poll: the episode, its appointments and its messages in one conditional
 * request (a 304 when nothing changed), stopped while the tab is hidden and asked again when it is
 * shown. A full answer is written into each part's own query, which the screen's components read;
 * those queries still load on their own when the screen opens and after a change made here.
 */
export function useEpisodeUpdates(referralId: MaybeRefOrGetter<number>) {
  const queryClient = useQueryClient()
  // A part refetched after this poll was sent (a change made on this screen) is newer: keep it.
  const put = (key: QueryKey, value: unknown, sentAt: number) => {
    if ((queryClient.getQueryState(key)?.dataUpdatedAt ?? 0) <= sentAt) queryClient.setQueryData(key, value)
  }
  return useQuery({
    queryKey: computed(() => episodeUpdateKeys.of(toValue(referralId))),
    queryFn: async ({ queryKey }): Promise<EpisodeUpdates | null> => {
      const id = toValue(referralId)
      const previous = queryClient.getQueryData<EpisodeUpdates | null>(queryKey) ?? undefined
      const sentAt = Date.now()
      const answer = await getEpisodeUpdates(id, previous)
      if (answer !== previous) {
        put(referralKeys.detail(id), answer.detail, sentAt)
        put(appointmentKeys.list(id), answer.appointments, sentAt)
        if (answer.messages) put(appointmentKeys.outbox(id), answer.messages, sentAt)
      }
      return answer
    },
    // The parts load themselves when the screen opens: the first poll waits one interval.
    initialData: null,
    staleTime: POLL_MS,
    refetchInterval: POLL_MS,
    refetchIntervalInBackground: false,
    refetchOnWindowFocus: true,
  })
}
