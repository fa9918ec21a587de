import { ref } from 'vue'
import { defineStore } from 'pinia'

/**
 * The clinic's zone, from the server's CLINIC_TIME_ZONE (GET /api/clinic-profile, loaded by the
 * router before any signed-in screen). Staff may sit in another zone (or a laptop may be set
 * wrong), so times are always shown in this zone and say so. Reactive, so a profile that arrives
 * after a screen was drawn (a first call that failed) redraws every time shown; until then, the
 * server's own default.
 */
export const useClinicZoneStore = defineStore('clinic-zone', () => {
  const timeZone = ref('Europe/London')
  const label = ref('UK time')

  function setZone(nextTimeZone: string, nextLabel: string): void {
    timeZone.value = nextTimeZone
    label.value = nextLabel
  }

  return { timeZone, label, setZone }
})
