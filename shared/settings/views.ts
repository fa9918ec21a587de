/** GET /api/clinic-profile: what the client needs to show the clinic and its times (server/routes/clinicProfile.ts). */
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
