import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { ColumnMapping } from '@shared/imports/mapping'
import {
  getMapping,
  listBatches,
  reverseBatch,
  saveMapping,
  uploadFhirBundle,
  uploadLabResults,
  type FhirUpload,
  type LabUpload,
} from '@/api/imports'
import { referralKeys } from '@/features/episode/composables/useReferrals'

export const importKeys = {
  all: ['imports'] as const,
  batches: () => [...importKeys.all, 'batches'] as const,
  mappings: () => [...importKeys.all, 'mapping'] as const,
  mapping: (source: string) => [...importKeys.mappings(), source] as const,
}

export function useImportBatchesQuery() {
  return useQuery({ queryKey: importKeys.batches(), queryFn: listBatches })
}

export function useMappingQuery(source: MaybeRefOrGetter<string>) {
  return useQuery({
    queryKey: computed(() => importKeys.mapping(toValue(source))),
    queryFn: () => getMapping(toValue(source)),
    enabled: computed(() => toValue(source).trim().length > 0),
  })
}

export function useSaveMappingMutation() {
  const qc = useQueryClient()
  return useMutation({
    mutationFn: ({ source, mapping }: { source: string; mapping: ColumnMapping }) => saveMapping(source, mapping),
    onSuccess: (saved) => qc.setQueryData(importKeys.mapping(saved.sourceName), saved),
  })
}

/** Stored results change classifications and flags: the worklist, episodes and the readiness board (all under referralKeys) refetch. */
function useInvalidateAfterStore() {
  const qc = useQueryClient()
  return () => Promise.all([qc.invalidateQueries({ queryKey: importKeys.batches() }), qc.invalidateQueries({ queryKey: referralKeys.all })])
}

/** A preview and a commit are the same call; only a commit changes anything to refetch. */
export function useLabUploadMutation() {
  const invalidate = useInvalidateAfterStore()
  return useMutation({
    mutationFn: (input: LabUpload) => uploadLabResults(input),
    onSuccess: (out) => (out.committed ? invalidate() : undefined),
  })
}

export function useFhirUploadMutation() {
  const invalidate = useInvalidateAfterStore()
  return useMutation({
    mutationFn: (input: FhirUpload) => uploadFhirBundle(input),
    onSuccess: (out) => (out.committed ? invalidate() : undefined),
  })
}

export function useReverseBatchMutation() {
  const invalidate = useInvalidateAfterStore()
  return useMutation({
    mutationFn: ({ id, reason }: { id: number; reason: string }) => reverseBatch(id, reason),
    onSuccess: invalidate,
  })
}
