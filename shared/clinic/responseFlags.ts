import { ironResponse, type MeasuredHb, type TreatmentGiven } from './evidence'

/** One recorded dose of an episode's course, oldest first, as the worklist's response flags read it. */
export interface DoseGiven {
  givenAt: Date | string
  doseMg: number
  route: 'iv' | 'oral' | null
}

/** The two response flags kept on the referral row (columns no_response_to_iron, hb_falling_after_iron). */
export interface ResponseFlags {
  noResponseToIron: boolean
  hbFallingAfterIron: boolean
}

/**
 * The course given so far, as the verdict's evidence reads it: the first dose's route names the
 * kind (an unrecorded route counts as IV, the clinic's usual course), and no deficit is assumed.
 */
export function treatmentFromDoses(doses: readonly DoseGiven[]): TreatmentGiven | null {
  if (!doses.length) return null
  return {
    kind: doses[0]!.route ?? 'iv',
    firstDoseAt: doses[0]!.givenAt,
    lastDoseAt: doses[doses.length - 1]!.givenAt,
    totalMg: doses.reduce((s, d) => s + d.doseMg, 0),
    deficitMg: null,
  }
}

/**
 * The worklist's response flags for one episode from its measured Hb (oldest first) and its
 * doses (oldest first): the same rule the readiness verdict gives as reasons (ironResponse), so
 * the flag on the row and the reason on the episode cannot disagree.
 */
export function responseFlags(hb: readonly MeasuredHb[], doses: readonly DoseGiven[], timeZone: string): ResponseFlags {
  const r = ironResponse(hb, treatmentFromDoses(doses), timeZone)
  return { noResponseToIron: r.nonResponse, hbFallingAfterIron: r.falling }
}
