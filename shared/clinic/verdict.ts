import type { BloodOrderDecision } from './bloodOrder'
import type { Evidence } from './evidence'
import { CELL_SALVAGE_BASIS, DECLINES_TARGET_UPLIFT_GL, DEFERRAL_HB_GL, NON_RESPONSE, TXA_BASIS } from './rules'
import type { ReadinessFlag, Verdict } from './readiness'

export { DEFERRAL_HB_GL } from './rules'

export interface VerdictInput {
  evidence: Evidence
  resultMaxAgeDays: number
  ironStudiesMaxAgeDays: number
  /** The anaemia threshold for this patient (criteria and sex). */
  thresholdGL: number
  /** The projection, which may include an assumed rise after iron. */
  projectedSurgeryHbGL: number
  projectionAssumesRise: boolean
  ironDeficientUntreated: boolean
  /** Allowable loss from the Hb the plan rests on (never above the latest measured value). */
  allowableLossMl: number
  expectedLossMl: number
  bloodOrder: BloodOrderDecision
  priority: string
  antibodiesPositive: boolean | null
  declinesTransfusion: boolean
}

export interface ReadinessVerdict {
  verdict: Verdict
  reasons: string[]
  /** What must be measured before the patient can be called ready, in words. */
  missing: string[]
  flags: ReadinessFlag[]
  /** The Hb the verdict is measured against (raised for a patient who declines transfusion). */
  targetHbGL: number
  /** Prompts for a patient who declines transfusion. */
  plan: string[]
}

const g = (x: number) => `${Math.round(x * 10) / 10} g/L`

function missingText(v: VerdictInput): string[] {
  const e = v.evidence
  return e.missing.map((m) => {
    switch (m) {
      case 'recent-hb':
        return e.latest
          ? `Needs a recent Hb: the latest (${g(e.latest.hbGL)}, ${e.latest.date}) is ${e.latest.ageDays} days old; results count ` +
              `for ${v.resultMaxAgeDays} days (local policy).`
          : 'Needs a recent Hb: none is recorded.'
      case 'iron-studies':
        return 'Needs iron studies: ferritin with TSAT or CRP.'
      case 'recent-iron-studies': {
        const old = e.ironStudiesTooOld
          .map((o) => `${o.analyte === 'ferritin' ? 'ferritin' : o.analyte.toUpperCase()} of ${o.date} (${o.ageDays} days old)`)
          .join(', ')
        return (
          `Needs recent iron studies: ${old || 'the iron studies on record are too old'}; iron studies count for ` +
          `${v.ironStudiesMaxAgeDays} days (local policy), so the iron status is unresolved.`
        )
      }
      case 'tsat-or-crp':
        return 'Needs TSAT or CRP: ferritin alone leaves the iron status unresolved (a functional deficiency is not excluded).'
      case 'recheck-after-iron':
        return 'Needs a re-check after iron: no Hb has been taken 14 or more days after the last dose, so the response is not yet measured.'
    }
  })
}

/**
 * The readiness verdict, its reasons in words, and what is missing. "Ready" needs evidence:
 * a recent measured Hb at or above the target, a resolved iron status and, after treatment, a
 * measured re-check. An assumed rise after iron is reported but can never earn "ready".
 * Deferral follows the ESA guideline (Kozek-Langenecker, Eur J Anaesthesiol 2017): postpone
 * elective major non-cancer surgery until anaemia is corrected — so only on the routine
 * pathway, and only as a prompt.
 */
export function readinessVerdict(v: VerdictInput): ReadinessVerdict {
  const e = v.evidence
  const reasons: string[] = []
  const flags: ReadinessFlag[] = []
  const plan: string[] = []
  const routine = v.priority === 'routine'
  const target = v.declinesTransfusion ? v.thresholdGL + DECLINES_TARGET_UPLIFT_GL : v.thresholdGL
  const measured = e.latest?.hbGL ?? null
  const measuredBelow = measured === null || measured < target
  const projectedBelow = v.projectedSurgeryHbGL < target
  const lossBeyondTolerance = v.expectedLossMl > v.allowableLossMl

  if (measured !== null) {
    reasons.push(
      measuredBelow
        ? `Latest measured Hb ${g(measured)} (${e.latest!.date}) is below the ${g(target)} target.`
        : `Latest measured Hb ${g(measured)} (${e.latest!.date}) is at or above the ${g(target)} target.`,
    )
  }
  if (v.projectionAssumesRise) {
    reasons.push(
      `Projected surgery-day Hb ${g(v.projectedSurgeryHbGL)} includes an assumed response to iron; it is not evidence until a ` +
        `re-check measures it, so it does not clear the patient or lower the blood order.`,
    )
  } else if (Math.abs(v.projectedSurgeryHbGL - (measured ?? 0)) >= 0.5) {
    reasons.push(`Projected surgery-day Hb ${g(v.projectedSurgeryHbGL)} from the measured trend.`)
  }
  if (v.declinesTransfusion) {
    flags.push('declines-transfusion')
    reasons.push(
      `The patient declines transfusion: the target is raised to ${g(target)} (anaemia threshold + ${DECLINES_TARGET_UPLIFT_GL} ` +
        `g/L, local policy).`,
    )
    plan.push(
      `Optimise Hb to at least ${g(target)} before surgery, starting early; treat iron deficiency promptly.`,
      `Cell salvage: ask whether the patient accepts it and book it for theatre (${CELL_SALVAGE_BASIS}).`,
      `Tranexamic acid: plan it unless contraindicated (${TXA_BASIS}).`,
      "Keep blood sampling to the minimum, and record the patient's decision on which products and procedures they accept (local policy).",
    )
  }
  if (v.antibodiesPositive) {
    flags.push('red-cell-antibodies')
    reasons.push('Positive red-cell antibody screen: crossmatch is required and the laboratory needs extra time.')
  }
  if (e.latest && !e.hbRecent) flags.push('result-too-old')
  if (e.missing.includes('recent-iron-studies')) flags.push('iron-studies-too-old')
  if (v.ironDeficientUntreated) reasons.push('Iron deficiency found at screening and no iron treatment is recorded.')
  if (e.nonResponse) {
    flags.push('no-response-to-iron')
    reasons.push(
      `No response to IV iron: Hb rose less than ${NON_RESPONSE.minRiseGL} g/L (from ${g(e.baseline!.hbGL)}) by 4 weeks or more ` +
        `after the first dose (${NON_RESPONSE.basis}). Review the diagnosis, ongoing blood loss and other causes.`,
    )
  }
  if (e.falling) {
    flags.push('hb-falling')
    reasons.push(
      `Hb is falling after iron: the latest value is ${g(e.latest!.hbGL)}, below the value before treatment. Look for ongoing ` +
        `blood loss or another cause before surgery.`,
    )
  }
  reasons.push(
    lossBeyondTolerance
      ? `The operation's usual loss (${v.expectedLossMl} mL) is more than this patient can lose before reaching the trigger ` +
          `(${v.allowableLossMl} mL).`
      : `The operation's usual loss (${v.expectedLossMl} mL) is within the loss this patient can tolerate (${v.allowableLossMl} mL).`,
  )
  reasons.push(`Blood order decided by: ${v.bloodOrder.decidedBy}`)

  const missing = missingText(v)
  const done = (verdict: Verdict): ReadinessVerdict => ({ verdict, reasons, missing, flags, targetHbGL: target, plan })

  if (e.falling) {
    if (routine) {
      reasons.push(
        'Routine operation with a falling Hb: consider postponing until the cause is found (ESA guideline, Kozek-Langenecker 2017).',
      )
      return done('consider-deferral')
    }
    reasons.push('Not a routine operation: find the cause of the fall within the time available rather than postpone.')
    return done('optimise')
  }
  const worstHb = Math.min(v.projectedSurgeryHbGL, measured ?? v.projectedSurgeryHbGL)
  if (routine && projectedBelow && (v.projectedSurgeryHbGL < DEFERRAL_HB_GL || lossBeyondTolerance)) {
    reasons.push(
      `Routine operation, still anaemic on the day (below ${DEFERRAL_HB_GL} g/L, local policy, or the usual loss beyond ` +
        `tolerance): consider postponing until the anaemia is corrected (ESA guideline, Kozek-Langenecker 2017).`,
    )
    return done('consider-deferral')
  }
  if (measuredBelow || projectedBelow || v.ironDeficientUntreated || e.nonResponse) {
    if (!routine && worstHb < target) reasons.push('Not a routine operation: optimise within the time available rather than postpone.')
    return done('optimise')
  }
  if (missing.length) return done('results-needed')
  return done('ready')
}
