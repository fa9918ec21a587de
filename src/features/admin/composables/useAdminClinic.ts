import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { CreateIronProductInput, UpdateIronProductInput } from '@shared/schemas/formulary'
import type { ClinicSettingsInput } from '@shared/schemas/clinicSettings'
import type { CreateProcedureInput, UpdateProcedureInput } from '@shared/schemas/procedures'
import { createIronProduct, listFormulary, saveDosingTable, updateIronProduct } from '@/api/formulary'
import type { DosingTableInput } from '@shared/schemas/dosingTable'
import { getClinicSettings, updateClinicSettings } from '@/api/clinicSettings'
import { createProcedure, listAllProcedures, updateProcedure } from '@/api/catalogue'
import { procedureKeys } from '@/composables/useCatalogue'
import { referralKeys } from '@/features/episode/composables/useReferrals'

/** The admin's reference data: formulary, clinic thresholds and the operations catalogue. */
export const formularyKeys = {
  all: ['formulary'] as const,
  list: (includeInactive: boolean) => [...formularyKeys.all, 'list', includeInactive] as const,
}
export const clinicSettingsKeys = { all: ['clinic-settings'] as const }
const allProceduresKey = [...procedureKeys.all, 'all'] as const

export function useFormularyQuery(includeInactive = false) {
  return useQuery({ queryKey: formularyKeys.list(includeInactive), queryFn: () => listFormulary(includeInactive) })
}

export function useClinicSettingsQuery() {
  return useQuery({ queryKey: clinicSettingsKeys.all, queryFn: getClinicSettings })
}

export function useAllProceduresQuery() {
  return useQuery({ queryKey: allProceduresKey, queryFn: listAllProcedures })
}

/** Caps, thresholds and usual losses feed every projection: open episodes refetch after a change. */
function useInvalidate(key: readonly unknown[]) {
  const queryClient = useQueryClient()
  return async () => {
    await queryClient.invalidateQueries({ queryKey: key })
    await queryClient.invalidateQueries({ queryKey: referralKeys.all })
  }
}

export function useCreateIronProductMutation() {
  const onSuccess = useInvalidate(formularyKeys.all)
  return useMutation({ mutationFn: (input: CreateIronProductInput) => createIronProduct(input), onSuccess })
}

export function useUpdateIronProductMutation() {
  const onSuccess = useInvalidate(formularyKeys.all)
  return useMutation({
    mutationFn: ({ code, changes }: { code: string; changes: UpdateIronProductInput }) => updateIronProduct(code, changes),
    onSuccess,
  })
}

/** A product's own dosing table changes every plan made with it: formulary and episodes refetch. */
export function useSaveDosingTableMutation() {
  const onSuccess = useInvalidate(formularyKeys.all)
  return useMutation({
    mutationFn: ({ code, input }: { code: string; input: DosingTableInput }) => saveDosingTable(code, input),
    onSuccess,
  })
}

export function useUpdateClinicSettingsMutation() {
  const onSuccess = useInvalidate(clinicSettingsKeys.all)
  return useMutation({ mutationFn: (changes: ClinicSettingsInput) => updateClinicSettings(changes), onSuccess })
}

export function useCreateProcedureMutation() {
  const onSuccess = useInvalidate(procedureKeys.all)
  return useMutation({ mutationFn: (input: CreateProcedureInput) => createProcedure(input), onSuccess })
}

export function useUpdateProcedureMutation() {
  const onSuccess = useInvalidate(procedureKeys.all)
  return useMutation({
    mutationFn: ({ code, changes }: { code: string; changes: UpdateProcedureInput }) => updateProcedure(code, changes),
    onSuccess,
  })
}
