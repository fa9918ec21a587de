import { api } from './client'

export interface ClinicProfile {
  name: string
  service: string
  phone: string
  /** IANA zone appointments are stated in (the server's CLINIC_TIME_ZONE). */
  timeZone: string
  /** 'UK time': the short form shown beside times. */
  zoneLabel: string
  zoneName: string
}

export function getClinicProfile(): Promise<ClinicProfile> {
  return api.get<ClinicProfile>('/clinic-profile')
}
