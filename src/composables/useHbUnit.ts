import { storeToRefs } from 'pinia'
import { convertHb } from '@shared/clinical/units'
import { usePreferencesStore } from '@/stores/preferences'

/** Decimals per unit, so each reads as a lab would print it (g/L whole, g/dL and mmol/L one place). */
const DECIMALS = { 'g/L': 0, 'g/dL': 1, 'mmol/L': 1 } as const

/** Hb from its canonical g/L into the unit this reader chose, through the clinical library. */
export function useHbUnit() {
  const { hbUnit } = storeToRefs(usePreferencesStore())

  function hbValue(gL: number): number {
    try {
      return convertHb(gL, 'g/L', hbUnit.value)
    } catch {
      // Out of the plausible range (never stored by the server): show the canonical figure.
      return gL
    }
  }

  /** The number only, rounded for the chosen unit. */
  function hbNumber(gL: number | null | undefined): string {
    if (gL == null) return '—'
    return hbValue(gL).toFixed(DECIMALS[hbUnit.value])
  }

  /** Number and unit together, e.g. "11.2 g/dL". */
  function hbText(gL: number | null | undefined): string {
    return gL == null ? '—' : `${hbNumber(gL)} ${hbUnit.value}`
  }

  return { hbUnit, hbValue, hbNumber, hbText }
}
