import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import { clinicLongDate, clinicShortDate, clinicSpan, clinicTime, clinicZone, setClinicZone } from '../../../src/display/appointments'

// 2026-07-14T08:30Z: 09:30 in London (BST, UTC+1), 04:30 in New York (EDT, UTC−4), 18:30 in
// Brisbane (AEST, UTC+10, no daylight saving). Offsets from the IANA tz database.
const instant = '2026-07-14T08:30:00.000Z'

// The zone is reactive state in a Pinia store; each test starts from a fresh one.
beforeEach(() => setActivePinia(createPinia()))
afterEach(() => setClinicZone('Europe/London', 'UK time'))

describe('staff screens show times in the clinic zone the server names', () => {
  it('when nothing was loaded, then the server default (Europe/London) applies', () => {
    expect(clinicZone()).toBe('Europe/London')
    expect(clinicTime(instant)).toBe('09:30')
  })

  it('when the server names another zone, then every time and date follows it, with its label', () => {
    setClinicZone('America/New_York', 'America/New York')
    expect(clinicTime(instant)).toBe('04:30')
    expect(clinicSpan(instant, '2026-07-14T09:30:00.000Z')).toBe('04:30–05:30 America/New York')
    setClinicZone('Australia/Brisbane', 'Australia/Brisbane')
    expect(clinicTime('2026-07-14T20:00:00.000Z')).toBe('06:00')
    // The calendar day moves with the zone: 20:00Z on the 14th is the 15th in Brisbane.
    expect(clinicShortDate('2026-07-14T20:00:00.000Z')).toBe('Wed 15 Jul 2026')
    expect(clinicLongDate('2026-07-14T20:00:00.000Z')).toContain('15 July 2026')
  })
})
