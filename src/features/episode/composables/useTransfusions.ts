import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import { editTransfusion, listTransfusions, recordTransfusion, voidTransfusion, type TransfusionPayload } from '@/api/transfusions'
import type { TransfusionInput } from '@shared/schemas/transfusions'
import { referralKeys } from './useReferrals'
import { retryUnlessRefused } from './useClinic'

/** Under the episode's key: a transfusion changes the post-operative record's unit counts too. */
export const transfusionKeys = {
  list: (id: number) => [...referralKeys.detail(id), 'transfusions'] as const,
}

/** How the server's refusals name a transfusion's fields, put before a bare message under the field. */
export const TRANSFUSION_FIELD_LABELS = { givenAt: 'Given at', reason: 'Reason', productCodes: 'Product codes' }

/**
 * A transfusion as the API takes it, from the form's checked values and the product codes as
 * typed (separated by spaces or commas); "Given at" is the clinic computer's local time.
 */
export function toTransfusionPayload(v: TransfusionInput, codesText: string): TransfusionPayload {
  return {
    givenAt: new Date(v.givenAt as unknown as string | Date).toISOString(),
    phase: v.phase ?? undefined,
    component: v.component,
    units: v.units,
    preTransfusionHbGL: v.preTransfusionHbGL ?? null,
    postTransfusionHbGL: v.postTransfusionHbGL ?? null,
    reassessedBeforeNext: v.reassessedBeforeNext,
    informationGiven: v.informationGiven,
    productCodes: codesText.split(/[\s,]+/).filter(Boolean),
    reason: v.reason ?? null,
  }
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
