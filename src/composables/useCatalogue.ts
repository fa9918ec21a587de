import { useQuery } from '@tanstack/vue-query'
import { listProcedures } from '@/api/procedures'
import { listStaff } from '@/api/staff'

export const procedureKeys = {
  all: ['procedures'] as const,
  list: () => [...procedureKeys.all, 'list'] as const,
}

export const staffKeys = {
  all: ['staff'] as const,
  byRole: (role: string) => [...staffKeys.all, role] as const,
}

// Reference lists change rarely (an admin edits them); five minutes old is fresh enough for a picker.
const REFERENCE_STALE_MS = 5 * 60_000

export function useProceduresQuery() {
  return useQuery({ queryKey: procedureKeys.list(), queryFn: listProcedures, staleTime: REFERENCE_STALE_MS })
}

export function useSurgeonsQuery() {
  return useQuery({ queryKey: staffKeys.byRole('surgeon'), queryFn: () => listStaff('surgeon'), staleTime: REFERENCE_STALE_MS })
}
