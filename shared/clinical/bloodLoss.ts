import { requireInRange, optionalInRange, requireOneOf } from './errors'
import { CLINICAL_LIMITS } from './limits'

export type AllowableLossMethod = 'gross' | 'logarithmic'

/**
 * Allowable blood loss in mL before Hb falls from hbStartGL to hbFloorGL, assuming
 * normovolaemic replacement of the lost volume.
 *
 * - 'gross' (default): Gross JB, Anesthesiology 1983;58:277 — EBV·(Hi − Hf)/mean(Hi, Hf).
 * - 'logarithmic': Bourke DL, Smith TC, Anesthesiology 1974;41:609 — EBV·ln(Hi/Hf), the exact
 *   isovolaemic solution that Gross's formula approximates.
 *
 * Returns 0 when the start is at or below the floor: there is no loss to allow.
 */
export function allowableBloodLoss(input: { ebvMl: number; hbStartGL: number; hbFloorGL: number; method?: AllowableLossMethod }): number {
  const ebv = requireInRange('ebvMl', input.ebvMl, CLINICAL_LIMITS.ebvMl)
  const hi = requireInRange('hbStartGL', input.hbStartGL, CLINICAL_LIMITS.hbGL)
  const hf = requireInRange('hbFloorGL', input.hbFloorGL, CLINICAL_LIMITS.hbGL)
  const method = input.method === undefined ? 'gross' : requireOneOf('method', input.method, ['gross', 'logarithmic'] as const)
  if (hi <= hf) return 0
  return method === 'gross' ? (ebv * (hi - hf)) / ((hi + hf) / 2) : ebv * Math.log(hi / hf)
}

/** Stated with every red-cell-volume figure, because the haematocrit is not measured. */
export const HCT_FROM_HB_ASSUMPTION =
  'Haematocrit estimated from Hb as Hct ≈ Hb (g/dL) × 3 / 100, i.e. Hb (g/L) × 0.003 (common practice, no single source); a ' +
  'measured haematocrit is better.'

export const DEFAULT_UNIT_RED_CELL_ML = 200

/** Haematocrit (fraction) from Hb in g/L by the rule of three (common practice). */
export function hctFromHbGL(hbGL: number): number {
  return requireInRange('hbGL', hbGL, CLINICAL_LIMITS.hbGL) * 0.003
}

export interface RedCellNeed {
  /** Red-cell volume the patient can lose before reaching the floor (never below 0). */
  toleratedRedCellMl: number
  expectedRedCellLossMl: number
  /** Red-cell volume to be given; includes any shortfall if the patient starts below the floor. */
  deficitMl: number
  units: number
  /** True when the start is already below the floor (tolerated is then 0). */
  startsBelowFloor: boolean
}

// Float noise (0.40 − 0.27 = 0.13000000000000003) must not tip a deficit of exactly n units
// into n + 1, so the deficit is taken to the nearest 0.001 mL before the ceiling.
function unitsFor(deficitMl: number, unitMl: number): number {
  const d = Math.round(Math.max(0, deficitMl) * 1000) / 1000
  return Math.ceil(d / unitMl)
}

/**
 * Red-cell transfusion need by the red-cell-volume method of Mercuriali F, Inghilleri G,
 * Curr Med Res Opin 1996;13:465 ("need = predicted red-cell loss − tolerated red-cell loss"),
 * from haematocrits. Working form (from memory, reference §4): tolerated RCV =
 * EBV·(Hct_start − Hct_floor); deficit = predicted RCV loss − tolerated; units =
 * ⌈max(0, deficit)/unit RCV⌉, unit RCV default 200 mL. All volumes are red-cell volume, mL.
 */
export function redCellNeedFromHct(input: {
  ebvMl: number
  hctStart: number
  hctFloor: number
  expectedRedCellLossMl: number
  unitRedCellMl?: number
}): RedCellNeed {
  const ebv = requireInRange('ebvMl', input.ebvMl, CLINICAL_LIMITS.ebvMl)
  const hctStart = requireInRange('hctStart', input.hctStart, CLINICAL_LIMITS.hct)
  const hctFloor = requireInRange('hctFloor', input.hctFloor, CLINICAL_LIMITS.hct)
  const loss = requireInRange('expectedRedCellLossMl', input.expectedRedCellLossMl, CLINICAL_LIMITS.redCellLossMl)
  const unitMl = optionalInRange('unitRedCellMl', input.unitRedCellMl, CLINICAL_LIMITS.unitRedCellMl) ?? DEFAULT_UNIT_RED_CELL_ML
  // A negative tolerance means the patient must be brought up to the floor as well as
  // replacing the loss, so it enters the deficit unclamped; only the displayed figure is 0.
  const rawTolerated = ebv * (hctStart - hctFloor)
  const deficitMl = loss - rawTolerated
  return {
    toleratedRedCellMl: Math.max(0, rawTolerated),
    expectedRedCellLossMl: loss,
    deficitMl,
    units: unitsFor(deficitMl, unitMl),
    startsBelowFloor: rawTolerated < 0,
  }
}

/**
 * Red-cell transfusion need (Mercuriali & Inghilleri 1996, as redCellNeedFromHct) from Hb in
 * g/L and an expected whole-blood loss in mL. Haematocrits come from HCT_FROM_HB_ASSUMPTION.
 * The expected red-cell loss is the red-cell volume shed while losing that much blood with the
 * volume kept up by clear fluid: EBV·Hct_start·(1 − e^(−loss/EBV)). That is the same
 * normovolaemic model as the logarithmic allowable loss (Bourke & Smith 1974), so a loss within
 * the allowable loss never asks for blood, and one beyond it always does: the two figures a
 * surgeon reads side by side cannot contradict each other.
 */
export function redCellTransfusionNeed(input: {
  ebvMl: number
  hbStartGL: number
  hbFloorGL: number
  expectedLossMl: number
  unitRedCellMl?: number
}): RedCellNeed {
  const hctStart = hctFromHbGL(requireInRange('hbStartGL', input.hbStartGL, CLINICAL_LIMITS.hbGL))
  const hctFloor = hctFromHbGL(requireInRange('hbFloorGL', input.hbFloorGL, CLINICAL_LIMITS.hbGL))
  const lossMl = requireInRange('expectedLossMl', input.expectedLossMl, CLINICAL_LIMITS.bloodLossMl)
  const ebvMl = requireInRange('ebvMl', input.ebvMl, CLINICAL_LIMITS.ebvMl)
  return redCellNeedFromHct({
    ebvMl,
    hctStart,
    hctFloor,
    expectedRedCellLossMl: ebvMl * hctStart * (1 - Math.exp(-lossMl / ebvMl)),
    unitRedCellMl: input.unitRedCellMl,
  })
}
