import { todayInZone } from '../../shared/pathway'

/**
 * The clinic's time zone (CLINIC_TIME_ZONE), the one calendar every clinical day count uses:
 * flags, the projection, the age of a result, the board's window. createApp() sets it from the
 * typed config once, so services deep in a use case need not carry the config for a date.
 */
let zone = 'Europe/London'

export function setClinicTimeZone(timeZone: string): void {
  zone = timeZone
}

export function clinicTimeZone(): string {
  return zone
}

/** Today on the clinic's calendar, never the server process's local date or UTC. */
export function clinicToday(now: Date = new Date()): string {
  return todayInZone(zone, now)
}
