import { optionalInRange, requireInRange } from './errors'
import { CLINICAL_LIMITS } from './limits'

export type IronStatus = 'absolute-deficiency' | 'iron-restricted' | 'replete' | 'indeterminate'

/**
 * Plain-language statement of the rule, for display beside the result. The paper is real and
 * checked (Anaesthesia 2017;72:233); the cut-offs were written from memory and are not yet
 * checked against its text, so the screen names them local policy "after" the consensus.
 */
export const IRON_STATUS_CRITERIA =
  'Local policy, after the international consensus on peri-operative anaemia (Muñoz et al., Anaesthesia 2017;72:233): ferritin ' +
  '< 30 µg/L is absolute iron deficiency; ferritin < 100 µg/L with TSAT < 20 % or CRP > 5 mg/L is iron deficiency with ' +
  'inflammation; ferritin ≥ 100 µg/L with TSAT < 20 % suggests iron sequestration. Both latter are reported as iron-restricted.'

/**
 * Iron status from ferritin (µg/L), TSAT (%, 0–100, not a fraction) and CRP (mg/L), after the
 * international consensus of Muñoz M et al., Anaesthesia 2017;72:233 (cut-offs from memory,
 * to verify). Boundaries are strict: ferritin 30 is not < 30, ferritin 100 is not < 100.
 * - ferritin < 30 → 'absolute-deficiency'
 * - 30 ≤ ferritin < 100 with TSAT < 20 or CRP > 5 → 'iron-restricted' (deficiency with inflammation)
 * - ferritin ≥ 100 with TSAT < 20 → 'iron-restricted' (sequestration / functional deficiency)
 * - ferritin ≥ 30 with TSAT ≥ 20 and no criterion above → 'replete'
 * - ferritin ≥ 30 without TSAT and no criterion above → 'indeterminate' (TSAT is needed to
 *   exclude a functional deficiency; a normal CRP alone does not settle it)
 */
export function classifyIronStatus(input: { ferritinUgL: number; tsatPct?: number | null; crpMgL?: number | null }): IronStatus {
  const ferritin = requireInRange('ferritinUgL', input.ferritinUgL, CLINICAL_LIMITS.ferritinUgL)
  const tsat = optionalInRange('tsatPct', input.tsatPct, CLINICAL_LIMITS.tsatPct)
  const crp = optionalInRange('crpMgL', input.crpMgL, CLINICAL_LIMITS.crpMgL)
  if (ferritin < 30) return 'absolute-deficiency'
  const lowTsat = tsat !== undefined && tsat < 20
  const inflamed = crp !== undefined && crp > 5
  // Inflammation raises ferritin, so below 100 µg/L it no longer excludes deficiency; above
  // 100 only a low TSAT points to iron locked away from erythropoiesis.
  if (lowTsat || (ferritin < 100 && inflamed)) return 'iron-restricted'
  return tsat === undefined ? 'indeterminate' : 'replete'
}

/** True for the statuses that call for iron therapy review: absolute deficiency and iron-restricted. */
export function isIronDeficient(status: IronStatus): boolean {
  return status === 'absolute-deficiency' || status === 'iron-restricted'
}
