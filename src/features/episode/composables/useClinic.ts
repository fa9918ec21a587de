import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { AdministrationInput, DosePlanPreviewInput, PrescriptionInput, ReviewInput } from '@shared/schemas/clinic'
import { isApiError } from '@/api/client'
import {
  listAdministrations,
  listPrescriptions,
  listReviews,
  prescribe,
  previewDosePlan,
  recordAdministration,
  recordReview,
} from '@/api/clinic'
import { referralKeys } from './useReferrals'

/**
 * Clinic data hangs under the episode's own key, so anything that invalidates the episode
 * (referralKeys.all or .detail(id)) refetches its reviews, prescriptions and doses too.
 */
export const clinicKeys = {
  reviews: (id: number) => [...referralKeys.detail(id), 'reviews'] as const,
  dosePlan: (id: number, input: DosePlanPreviewInput) => [...referralKeys.detail(id), 'dose-plan', input] as const,
  prescriptions: (id: number) => [...referralKeys.detail(id), 'prescriptions'] as const,
  administrations: (id: number) => [...referralKeys.detail(id), 'administrations'] as const,
}

/** A refusal (4xx) will not change by asking again; only network trouble is worth a retry. */
export function retryUnlessRefused(count: number, error: unknown): boolean {
  return !(isApiError(error) && error.status >= 400 && error.status < 500) && count < 2
}

export function useReviewsQuery(id: MaybeRefOrGetter<number>) {
  return useQuery({ queryKey: computed(() => clinicKeys.reviews(toValue(id))), queryFn: () => listReviews(toValue(id)) })
}

export function usePrescriptionsQuery(id: MaybeRefOrGetter<number>) {
  return useQuery({ queryKey: computed(() => clinicKeys.prescriptions(toValue(id))), queryFn: () => listPrescriptions(toValue(id)) })
}

export function useAdministrationsQuery(id: MaybeRefOrGetter<number>) {
  return useQuery({ queryKey: computed(() => clinicKeys.administrations(toValue(id))), queryFn: () => listAdministrations(toValue(id)) })
}

/**
 * The server's dose plan for the inputs on the form: a read with no side effect, so a query
 * keyed on the (debounced) inputs; the last plan stays on screen while the next one loads.
 */
export function useDosePlanQuery(id: MaybeRefOrGetter<number>, input: MaybeRefOrGetter<DosePlanPreviewInput | null>) {
  return useQuery({
    queryKey: computed(() => clinicKeys.dosePlan(toValue(id), toValue(input) ?? { productCode: '' })),
    queryFn: () => previewDosePlan(toValue(id), toValue(input)!),
    enabled: computed(() => !!toValue(input)?.productCode),
    placeholderData: keepPreviousData,
    retry: retryUnlessRefused,
  })
}

function useInvalidateReferrals() {
  const queryClient = useQueryClient()
  return () => queryClient.invalidateQueries({ queryKey: referralKeys.all })
}

export function useRecordReviewMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: ReviewInput }) => recordReview(id, input),
    // A 409 means our version is stale: refetch either way.
    onSettled: invalidate,
  })
}

export function usePrescribeMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: PrescriptionInput }) => prescribe(id, input),
    onSettled: invalidate,
  })
}

export function useRecordAdministrationMutation() {
  const invalidate = useInvalidateReferrals()
  return useMutation({
    mutationFn: ({ id, input }: { id: number; input: AdministrationInput }) => recordAdministration(id, input),
    onSuccess: invalidate,
  })
}
