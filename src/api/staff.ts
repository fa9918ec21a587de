import type { Role } from '@shared/roles'
import { api } from './client'
import type { StaffOption } from './pathwayTypes'

/** Active colleagues of one role, names only (for pickers such as the referral's surgeon). */
export async function listStaff(role: Role): Promise<StaffOption[]> {
  const { rows } = await api.get<{ rows: StaffOption[] }>(`/staff?role=${role}`)
  return rows
}
