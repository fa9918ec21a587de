import {
  classifyAnaemia,
  classifyIronStatus,
  isIronDeficient,
  type AnaemiaCriteria,
  type AnaemiaSeverity,
  type IronStatus,
  type Sex,
} from '../clinical'
import type { Stage } from '../pathway/stages'
import type { IronStudies } from './ironStudies'

/**
 * The screening outcome as a rule on data, one copy for the server's result entry, the
 * laboratory imports and the demo seed (and any client preview).
 */
export interface ScreeningColumns {
  anaemic: boolean | null
  anaemiaSeverity: AnaemiaSeverity | null
  ironStatus: IronStatus | null
  proposedStage: Stage | null
  latestHbGL: number | null
  latestHbAt: Date | null
}

export interface LatestValues {
  hb?: { value: number; takenAt: Date }
  ferritin?: number
  tsat?: number
  crp?: number
}

export const SCREENING_ANALYTES = ['hb', 'ferritin', 'tsat', 'crp'] as const

/**
 * The screening outcome from the latest values on the episode, by the clinic's criteria.
 * Proposal: fit for theatre when neither anaemic nor iron deficient; clinic otherwise —
 * including an 'indeterminate' iron status (ferritin ≥ 30 without TSAT or CRP), because a
 * functional deficiency has not been excluded. Without an Hb, or without a ferritin in a
 * non-anaemic patient, the screen is incomplete and nothing is proposed.
 */
export function screeningOutcome(v: LatestValues, sex: Sex, criteria: AnaemiaCriteria): ScreeningColumns {
  const anaemia = v.hb ? classifyAnaemia({ hbGL: v.hb.value, sex, criteria }) : null
  const ironStatus = v.ferritin !== undefined ? classifyIronStatus({ ferritinUgL: v.ferritin, tsatPct: v.tsat, crpMgL: v.crp }) : null
  let proposedStage: Stage | null = null
  if (anaemia?.anaemic || (ironStatus && isIronDeficient(ironStatus))) proposedStage = 'clinic'
  else if (anaemia && ironStatus === 'replete') proposedStage = 'cleared'
  else if (anaemia && ironStatus === 'indeterminate') proposedStage = 'clinic'
  return {
    anaemic: anaemia ? anaemia.anaemic : null,
    anaemiaSeverity: anaemia ? anaemia.severity : null,
    ironStatus,
    proposedStage,
    latestHbGL: v.hb?.value ?? null,
    latestHbAt: v.hb?.takenAt ?? null,
  }
}

/** Latest of each screening analyte from rows ordered newest sample first (then newest entry). */
export function latestFromRows(rows: readonly { analyte: string; valueCanonical: number; takenAt: Date }[]): LatestValues {
  const out: LatestValues = {}
  for (const r of rows) {
    if (r.analyte === 'hb') out.hb ??= { value: r.valueCanonical, takenAt: r.takenAt }
    else if (r.analyte === 'ferritin' || r.analyte === 'tsat' || r.analyte === 'crp') out[r.analyte] ??= r.valueCanonical
  }
  return out
}

/** Latest ferritin, TSAT and CRP with their sample times, from rows ordered newest first. */
export function ironStudiesFromRows(rows: readonly { analyte: string; valueCanonical: number; takenAt: Date }[]): IronStudies {
  const out: IronStudies = {}
  for (const r of rows) {
    if (r.analyte === 'ferritin' || r.analyte === 'tsat' || r.analyte === 'crp')
      out[r.analyte] ??= { value: r.valueCanonical, takenAt: r.takenAt }
  }
  return out
}
