import type { Role } from '@shared/roles'
import type { Rows } from '@shared/types'
import { api } from './client'
import type { StaffOption } from '@shared/pathway/views'

/** Active colleagues of one role, names only (for pickers such as the referral's surgeon). */
export async function listStaff(role: Role): Promise<StaffOption[]> {
  const { rows } = await api.get<Rows<StaffOption>>(`/staff?role=${role}`)
  return rows
}
