import { requireInRange } from './errors'
import { CLINICAL_LIMITS } from './limits'

/**
 * Hb after losing `lossMl` of blood with the volume kept up by clear fluid (isovolaemic
 * haemodilution, no transfusion): Hb_end = Hb_start · e^(−loss / EBV). This is the same model
 * whose inverse is the logarithmic allowable blood loss (Bourke & Smith, Anesthesiology
 * 1974;41:609), so the two figures agree with each other.
 * @returns g/L
 */
export function hbAfterIsovolaemicLoss(input: { ebvMl: number; hbStartGL: number; lossMl: number }): number {
  const ebv = requireInRange('ebvMl', input.ebvMl, CLINICAL_LIMITS.ebvMl)
  const hb = requireInRange('hbStartGL', input.hbStartGL, CLINICAL_LIMITS.hbGL)
  const loss = requireInRange('lossMl', input.lossMl, CLINICAL_LIMITS.bloodLossMl)
  return hb * Math.exp(-loss / ebv)
}
