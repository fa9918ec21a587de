import type { ClinicSettings } from '@shared/clinic/settings'
import type { ClinicSettingsInput } from '@shared/schemas/clinicSettings'
import { api } from './client'

export function getClinicSettings(): Promise<ClinicSettings> {
  return api.get<ClinicSettings>('/settings/clinic')
}

export function updateClinicSettings(changes: ClinicSettingsInput): Promise<ClinicSettings> {
  return api.patch<ClinicSettings>('/settings/clinic', changes)
}
