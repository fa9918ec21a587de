/**
 * Blood ordering audit indices (clinical reference §9, 2022 audit): the counts come from the
 * post-operative records. Each returns null when its denominator is zero, because "no data"
 * must not read as a ratio of 0 on a report.
 */
export interface BloodOrderingCounts {
  unitsCrossmatched: number
  unitsTransfused: number
  patientsCrossmatched: number
  patientsTransfused: number
}

/** C:T = units crossmatched / units transfused; ≤ 2.5 is acceptable. */
export function crossmatchToTransfusionRatio(c: BloodOrderingCounts): number | null {
  return c.unitsTransfused > 0 ? c.unitsCrossmatched / c.unitsTransfused : null
}

/** T% = patients transfused / patients crossmatched × 100. */
export function transfusionProbabilityPercent(c: BloodOrderingCounts): number | null {
  return c.patientsCrossmatched > 0 ? (100 * c.patientsTransfused) / c.patientsCrossmatched : null
}

/** TI = units transfused / patients crossmatched; ≥ 0.5 justifies crossmatching. */
export function transfusionIndex(c: BloodOrderingCounts): number | null {
  return c.patientsCrossmatched > 0 ? c.unitsTransfused / c.patientsCrossmatched : null
}

export const ACCEPTABLE_CT_RATIO = 2.5
export const CROSSMATCH_JUSTIFIED_TI = 0.5
/** Commonly quoted cut-off, from memory (clinical reference §9 marks it [M]). */
export const LOW_TRANSFUSION_PROBABILITY_PERCENT = 30

export type BloodOrderSuggestion = 'keep' | 'group-and-screen' | 'fewer-units' | 'crossmatch'

/**
 * What the audit says about the catalogue's current order. A crossmatch order with a low TI
 * and T% wastes units (suggest group-and-screen); a C:T over 2.5 means too many units per
 * order; a group-and-screen operation whose patients are usually transfused needs a crossmatch.
 */
export function suggestBloodOrder(
  current: { order: 'group-and-screen' | 'crossmatch'; units: number },
  c: BloodOrderingCounts & { patients: number; patientsTransfusedAll: number },
): { suggestion: BloodOrderSuggestion; reason: string } {
  const ti = transfusionIndex(c)
  const tp = transfusionProbabilityPercent(c)
  const ct = crossmatchToTransfusionRatio(c)
  if (current.order === 'crossmatch') {
    if (ti !== null && tp !== null && ti < CROSSMATCH_JUSTIFIED_TI && tp < LOW_TRANSFUSION_PROBABILITY_PERCENT) {
      return {
        suggestion: 'group-and-screen',
        reason:
          `TI ${ti.toFixed(2)} < ${CROSSMATCH_JUSTIFIED_TI} and T% ${tp.toFixed(0)} < ${LOW_TRANSFUSION_PROBABILITY_PERCENT}: ` +
          `crossmatching is not justified`,
      }
    }
    if (ct !== null && ct > ACCEPTABLE_CT_RATIO) {
      return { suggestion: 'fewer-units', reason: `C:T ${ct.toFixed(2)} > ${ACCEPTABLE_CT_RATIO}: fewer units per crossmatch` }
    }
    if (c.patientsCrossmatched > 0 && c.unitsTransfused === 0) {
      return { suggestion: 'group-and-screen', reason: 'No crossmatched unit was transfused' }
    }
  } else if (c.patients > 0 && (100 * c.patientsTransfusedAll) / c.patients >= LOW_TRANSFUSION_PROBABILITY_PERCENT) {
    return {
      suggestion: 'crossmatch',
      reason: `${((100 * c.patientsTransfusedAll) / c.patients).toFixed(0)}% of patients were transfused on a group-and-screen order`,
    }
  }
  return { suggestion: 'keep', reason: 'The audit agrees with the current order' }
}
