import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import { editTransfusion, listTransfusions, recordTransfusion, voidTransfusion, type TransfusionPayload } from '@/api/transfusions'
import { referralKeys } from './useReferrals'
import { retryUnlessRefused } from './useClinic'

/** Under the episode's key: a transfusion changes the post-operative record's unit counts too. */
export const transfusionKeys = {
  list: (id: number) => [...referralKeys.detail(id), 'transfusions'] as const,
}

export function useTransfusionsQuery(id: MaybeRefOrGetter<number>) {
  return useQuery({
    queryKey: computed(() => transfusionKeys.list(toValue(id))),
    queryFn: () => listTransfusions(toValue(id)),
    retry: retryUnlessRefused,
  })
}

export function useRecordTransfusionMutation() {
  const queryClient = useQueryClient()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: TransfusionPayload }) => recordTransfusion(id, input),
    onSettled: (_d, _e, v) => queryClient.invalidateQueries({ queryKey: referralKeys.detail(v.id) }),
  })
}

export function useVoidTransfusionMutation() {
  const queryClient = useQueryClient()
  return useMutation({
    mutationFn: ({ id, transfusionId, reason }: { id: number; transfusionId: number; reason: string }) =>
      voidTransfusion(id, transfusionId, reason),
    onSettled: (_d, _e, v) => queryClient.invalidateQueries({ queryKey: referralKeys.detail(v.id) }),
  })
}

export function useEditTransfusionMutation() {
  const queryClient = useQueryClient()
  return useMutation({
    mutationFn: ({
      id,
      transfusionId,
      input,
    }: {
      id: number
      transfusionId: number
      input: TransfusionPayload & { changeReason: string }
    }) => editTransfusion(id, transfusionId, input),
    onSettled: (_d, _e, v) => queryClient.invalidateQueries({ queryKey: referralKeys.detail(v.id) }),
  })
}
