import type { ClinicProfile } from '@shared/settings/views'
import { api } from './client'

export function getClinicProfile(): Promise<ClinicProfile> {
  return api.get<ClinicProfile>('/clinic-profile')
}
