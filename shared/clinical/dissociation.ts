import { ClinicalInputError, optionalInRange, requireInRange, requireOneOf, requireSaturation } from './errors'
import { CLINICAL_LIMITS } from './limits'

export type DissociationModel = 'severinghaus' | 'hill'

export interface DissociationOptions {
  /** Default 'severinghaus'. */
  model?: DissociationModel
  /** Default 26.8 mmHg, the standard adult P50. */
  p50MmHg?: number
  /** Hill coefficient; only used by the Hill model. Default 2.7. */
  hillN?: number
}

export const STANDARD_P50_MMHG = 26.8
export const DEFAULT_HILL_N = 2.7

interface Resolved {
  model: DissociationModel
  p50: number
  n: number
}

function resolve(options: DissociationOptions | undefined): Resolved {
  const o = options ?? {}
  return {
    model: o.model === undefined ? 'severinghaus' : requireOneOf('model', o.model, ['severinghaus', 'hill'] as const),
    p50: optionalInRange('p50MmHg', o.p50MmHg, CLINICAL_LIMITS.p50MmHg) ?? STANDARD_P50_MMHG,
    n: optionalInRange('hillN', o.hillN, CLINICAL_LIMITS.hillN) ?? DEFAULT_HILL_N,
  }
}

// Severinghaus 1979 eq. 1 on the standard curve. At x = 0 the division gives Infinity and
// S = 0, which is the physical limit.
function severinghausEq1(x: number): number {
  return 1 / (23400 / (x ** 3 + 150 * x) + 1)
}

// Exact inverse of eq. 1: it rearranges to the cubic x³ + 150x = 23400·S/(1−S), whose single
// real root is Cardano's (the same closed form Ellis 1989 published). Newton steps remove
// the cancellation error of u − 50/u at low saturations.
function severinghausEq1Inverse(s: number): number {
  const q = (23400 * s) / (1 - s)
  const a = q / 2
  const u = Math.cbrt(a + Math.sqrt(a * a + 125000))
  let x = u - 50 / u
  for (let i = 0; i < 3; i += 1) {
    x -= (x ** 3 + 150 * x - q) / (3 * x * x + 150)
  }
  return Math.max(0, x)
}

/**
 * Oxyhaemoglobin saturation (fraction 0–1) from PO2 in mmHg.
 *
 * - 'severinghaus' (default): Severinghaus JW, J Appl Physiol 1979;46:599, eq. 1. A P50 other
 *   than 26.8 mmHg shifts the curve by evaluating eq. 1 at PO2 × 26.8 / P50 (Kelman,
 *   J Appl Physiol 1966;21:1375). Note eq. 1's own P50 is about 26.86 mmHg.
 * - 'hill': S = PO2ⁿ / (PO2ⁿ + P50ⁿ), n 2.7 and P50 26.8 mmHg by default.
 */
export function saturationFromPo2(po2MmHg: number, options?: DissociationOptions): number {
  const po2 = requireInRange('po2MmHg', po2MmHg, CLINICAL_LIMITS.po2MmHg)
  const { model, p50, n } = resolve(options)
  if (model === 'hill') {
    if (po2 === 0) return 0
    return 1 / (1 + (p50 / po2) ** n)
  }
  return severinghausEq1(po2 * (STANDARD_P50_MMHG / p50))
}

/**
 * PO2 in mmHg at a given saturation (fraction), the exact inverse of saturationFromPo2 for the
 * same model and options (Severinghaus 1979 eq. 1 solved in closed form, or the Hill equation
 * rearranged).
 *
 * Saturation 0 returns 0 mmHg (both curves pass through the origin). Saturation 1 has no
 * finite inverse, and saturations whose PO2 would exceed 700 mmHg lie on the flat top of the
 * curve where a tiny change in SO2 means hundreds of mmHg: both are refused with
 * ClinicalInputError rather than returning a meaningless number.
 */
export function po2FromSaturation(so2: number, options?: DissociationOptions): number {
  const s = requireSaturation('so2', so2)
  const { model, p50, n } = resolve(options)
  if (s === 0) return 0
  if (s === 1) {
    throw new ClinicalInputError('so2', s, 'so2 of exactly 1 has no finite PO2; give a saturation below 1')
  }
  const po2 = model === 'hill' ? p50 * (s / (1 - s)) ** (1 / n) : severinghausEq1Inverse(s) * (p50 / STANDARD_P50_MMHG)
  if (po2 > CLINICAL_LIMITS.po2MmHg.max) {
    throw new ClinicalInputError(
      'so2',
      s,
      `so2 ${s} corresponds to a PO2 above ${CLINICAL_LIMITS.po2MmHg.max} mmHg, where the curve is flat; no meaningful PO2 can be given`,
    )
  }
  return po2
}

/**
 * Severinghaus 1979 eq. 2 (J Appl Physiol 46:599), his published approximate inverse on the
 * standard curve: ln PO2 = 0.385·ln(1/(1/S − 1)) + 3.32 − 1/(72S) − 0.17·S⁶. Returns mmHg.
 * It is not the exact inverse of eq. 1 (differences of a few tenths of a mmHg); use
 * po2FromSaturation for round trips. Saturation must be strictly between 0 and 1.
 */
export function severinghausInversePo2(so2: number): number {
  const s = requireSaturation('so2', so2)
  if (s === 0 || s === 1) {
    throw new ClinicalInputError('so2', s, `so2 must be strictly between 0 and 1 for Severinghaus eq. 2 (got ${s})`)
  }
  return Math.exp(0.385 * Math.log(1 / (1 / s - 1)) + 3.32 - 1 / (72 * s) - 0.17 * s ** 6)
}
