import type { BloodOrderKind, Verdict } from './readiness'

export interface VerdictInput {
  predictedSurgeryHbGL: number
  anaemicOnSurgeryDay: boolean
  thresholdGL: number
  ironDeficientUntreated: boolean
  allowableLossMl: number
  expectedLossMl: number
  bloodOrder: { kind: BloodOrderKind; units: number }
  priority: string
}

/** Below this, elective surgery is usually postponed where the operation allows (common practice). */
export const DEFERRAL_HB_GL = 100

/**
 * The readiness verdict and its reasons in words. ESA guideline (Kozek-Langenecker 2017):
 * postpone elective major non-cancer surgery until anaemia is corrected; so deferral is only
 * suggested on the routine pathway, and never as a decision, only as a prompt.
 */
export function readinessVerdict(v: VerdictInput): { verdict: Verdict; reasons: string[] } {
  const reasons: string[] = []
  const routine = v.priority === 'routine'
  const lossBeyondTolerance = v.expectedLossMl > v.allowableLossMl

  if (v.anaemicOnSurgeryDay) {
    reasons.push(`Predicted surgery-day Hb ${v.predictedSurgeryHbGL} g/L is below the ${v.thresholdGL} g/L anaemia threshold.`)
  } else {
    reasons.push(`Predicted surgery-day Hb ${v.predictedSurgeryHbGL} g/L is at or above the ${v.thresholdGL} g/L anaemia threshold.`)
  }
  if (v.ironDeficientUntreated) reasons.push('Iron deficiency found at screening and no iron treatment is recorded.')
  reasons.push(lossBeyondTolerance
    ? `The operation's usual loss (${v.expectedLossMl} mL) is more than this patient can lose before reaching the trigger (${v.allowableLossMl} mL).`
    : `The operation's usual loss (${v.expectedLossMl} mL) is within the loss this patient can tolerate (${v.allowableLossMl} mL).`)
  reasons.push(v.bloodOrder.kind === 'crossmatch'
    ? `Have ${v.bloodOrder.units} red-cell unit${v.bloodOrder.units === 1 ? '' : 's'} crossmatched.`
    : 'Group and screen is enough by the red-cell-volume estimate.')

  if (!v.anaemicOnSurgeryDay && !v.ironDeficientUntreated) return { verdict: 'ready', reasons }
  if (v.anaemicOnSurgeryDay && routine && (v.predictedSurgeryHbGL < DEFERRAL_HB_GL || lossBeyondTolerance)) {
    reasons.push('Routine operation: consider postponing until the anaemia is corrected (ESA guideline, Kozek-Langenecker 2017).')
    return { verdict: 'consider-deferral', reasons }
  }
  if (v.anaemicOnSurgeryDay && !routine) reasons.push('Not a routine operation: optimise within the time available rather than postpone.')
  return { verdict: 'optimise', reasons }
}
