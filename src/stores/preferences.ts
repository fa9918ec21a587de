import { ref, watch } from 'vue'
import { defineStore } from 'pinia'

/** Units a reader may choose for haemoglobin; values are stored canonically on the server. */
export const HB_UNITS = ['g/L', 'g/dL', 'mmol/L'] as const
export type HbUnit = (typeof HB_UNITS)[number]

const STORAGE_KEY = 'ferrolane.preferences'

interface StoredPreferences {
  hbUnit?: string
}

function isHbUnit(value: unknown): value is HbUnit {
  return typeof value === 'string' && (HB_UNITS as readonly string[]).includes(value)
}

function readStored(): StoredPreferences {
  try {
    const raw = localStorage.getItem(STORAGE_KEY)
    return raw ? (JSON.parse(raw) as StoredPreferences) : {}
  } catch {
    // Private mode or a hand-edited value: fall back to defaults rather than fail to start.
    return {}
  }
}

/** Per-browser reading preferences, kept in localStorage. */
export const usePreferencesStore = defineStore('preferences', () => {
  const stored = readStored()
  // g/L is the unit UK laboratories report, so it is the default.
  const hbUnit = ref<HbUnit>(isHbUnit(stored.hbUnit) ? stored.hbUnit : 'g/L')

  function setHbUnit(unit: HbUnit): void {
    hbUnit.value = unit
  }

  watch(hbUnit, (unit) => {
    try {
      localStorage.setItem(STORAGE_KEY, JSON.stringify({ hbUnit: unit }))
    } catch {
      // Storage full or blocked: the choice still holds for this visit.
    }
  })

  return { hbUnit, setHbUnit }
})
