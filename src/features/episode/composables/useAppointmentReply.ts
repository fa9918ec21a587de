import { computed, type Ref } from 'vue'
import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { AppointmentReply } from '@shared/appointments'
import { confirmReply, fetchReply, requestRebook } from '@/api/replies'

export const replyKeys = {
  all: ['appointment-reply'] as const,
  detail: (token: string) => [...replyKeys.all, token] as const,
}

/**
 * The appointment behind a patient's link. Not refetched on focus: an unknown link counts
 * towards the address's throttle each time it is asked for.
 */
export function useAppointmentReplyQuery(token: Ref<string>) {
  return useQuery({
    queryKey: computed(() => replyKeys.detail(token.value)),
    queryFn: () => fetchReply(token.value),
    staleTime: Infinity,
    refetchOnWindowFocus: false,
  })
}

function useStoreAnswer(token: Ref<string>) {
  const queryClient = useQueryClient()
  return (reply: AppointmentReply) => queryClient.setQueryData(replyKeys.detail(token.value), reply)
}

export function useConfirmReplyMutation(token: Ref<string>) {
  const store = useStoreAnswer(token)
  return useMutation({ mutationFn: () => confirmReply(token.value), onSuccess: store })
}

export function useRebookRequestMutation(token: Ref<string>) {
  const store = useStoreAnswer(token)
  return useMutation({ mutationFn: (message: string | null) => requestRebook(token.value, message), onSuccess: store })
}
