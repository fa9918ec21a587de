import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { UploadKind } from '@shared/schemas/documents'
import { listDocuments, uploadDocument, writeFamilyDoctorLetter } from '@/api/documents'

export const documentKeys = {
  all: ['documents'] as const,
  list: (referralId: number) => [...documentKeys.all, 'referral', referralId] as const,
}

export function useDocumentsQuery(referralId: MaybeRefOrGetter<number>) {
  return useQuery({
    queryKey: computed(() => documentKeys.list(toValue(referralId))),
    queryFn: () => listDocuments(toValue(referralId)),
  })
}

export function useUploadDocumentMutation(referralId: MaybeRefOrGetter<number>) {
  const qc = useQueryClient()
  return useMutation({
    mutationFn: (input: { kind: UploadKind; title: string; file: File }) => uploadDocument(toValue(referralId), input),
    onSuccess: () => qc.invalidateQueries({ queryKey: documentKeys.list(toValue(referralId)) }),
  })
}

export function useWriteLetterMutation(referralId: MaybeRefOrGetter<number>) {
  const qc = useQueryClient()
  return useMutation({
    mutationFn: () => writeFamilyDoctorLetter(toValue(referralId)),
    onSuccess: () => qc.invalidateQueries({ queryKey: documentKeys.list(toValue(referralId)) }),
  })
}
