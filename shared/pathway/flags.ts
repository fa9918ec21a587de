import { PRE_OPERATIVE_STAGES, type Stage } from './stages'
import { dateInZone, daysBetween } from './dates'

/** Worklist flags: conditions the service wants to see before they become problems. */
export const WORKLIST_FLAGS = [
  'surgery-soon-anaemic',
  'no-screening-result',
  'recheck-overdue',
  'treatment-not-given',
  'date-change-requested',
  'no-response-to-iron',
  'hb-falling',
] as const
export type WorklistFlag = (typeof WORKLIST_FLAGS)[number]

export function isWorklistFlag(value: unknown): value is WorklistFlag {
  return typeof value === 'string' && (WORKLIST_FLAGS as readonly string[]).includes(value)
}

export const FLAG_LABELS: Record<WorklistFlag, string> = {
  'surgery-soon-anaemic': 'Surgery soon, still anaemic',
  'no-screening-result': 'No screening bloods yet',
  'recheck-overdue': 'Re-check overdue',
  'treatment-not-given': 'Treatment ordered, not given',
  'date-change-requested': 'Surgeon asks to move the date',
  'no-response-to-iron': 'No response to IV iron',
  'hb-falling': 'Hb falling after iron',
}

/**
 * Screening should be done at least 28 days before surgery, so an anaemic patient inside that
 * window is the case the clinic must act on first. Origin, checked with the search tool against
 * the PubMed abstract (PMID 21148637): the NATA guidelines (Goodnough et al., Br J Anaesth
 * 2011;106:13–22) recommend an Hb 28 days before scheduled elective orthopaedic surgery where
 * possible (grade 1C). Ferrolane applies it to every operation (local policy). It is not from
 * the Muñoz 2017 consensus, to which it was once attributed here.
 */
export const SURGERY_SOON_BASIS =
  'NATA guidelines (Goodnough et al., Br J Anaesth 2011;106:13–22): an Hb 28 days before elective orthopaedic surgery where ' +
  'possible; applied to every operation by local policy'
export const SURGERY_SOON_DAYS = 28

export interface FlagInput {
  stage: Stage
  plannedSurgeryDate: string
  anaemic: boolean | null
  latestHbAt: Date | string | null
  recheckDueDate: string | null
  treatmentOrderedAt: Date | string | null
  treatmentGivenAt: Date | string | null
  /** The operating surgeon asked for the date to move (readiness review). */
  dateChangeRequestedAt?: Date | string | null
  /**
   * Kept on the referral row from measured Hb and doses (ironResponse in shared/clinic/evidence.ts:
   * a rise under 10 g/L by 4 weeks after IV iron; a fall of 5 g/L or more below the value before
   * treatment), the same rules the readiness verdict gives as reasons.
   */
  noResponseToIron?: boolean | number | null
  hbFallingAfterIron?: boolean | number | null
}

/**
 * The flags raised for one referral on the clinic's day `todayIso`. Instants (the time an Hb
 * was taken) are read on the clinic's calendar in `timeZone`, the same calendar as `todayIso`
 * (todayInZone), so an Hb taken at 00:30 clinic time counts on that day, not the UTC day
 * before. Flags only apply before surgery. The server's worklist filter expresses the same
 * rules in SQL (services/worklist.ts); the API tests hold the two together.
 */
export function referralFlags(r: FlagInput, todayIso: string, timeZone: string): WorklistFlag[] {
  if (!PRE_OPERATIVE_STAGES.includes(r.stage)) return []
  const flags: WorklistFlag[] = []
  const days = daysBetween(todayIso, r.plannedSurgeryDate)
  if (r.anaemic === true && days >= 0 && days <= SURGERY_SOON_DAYS) flags.push('surgery-soon-anaemic')
  if (r.latestHbAt == null) flags.push('no-screening-result')
  // The re-check counts as done once an Hb has been taken on or after its due date.
  if (
    r.recheckDueDate &&
    r.recheckDueDate < todayIso &&
    (r.stage === 'treating' || r.stage === 'recheck') &&
    (r.latestHbAt == null || dateInZone(r.latestHbAt, timeZone) < r.recheckDueDate)
  ) {
    flags.push('recheck-overdue')
  }
  if (r.treatmentOrderedAt != null && r.treatmentGivenAt == null) flags.push('treatment-not-given')
  if (r.dateChangeRequestedAt != null) flags.push('date-change-requested')
  if (r.noResponseToIron) flags.push('no-response-to-iron')
  if (r.hbFallingAfterIron) flags.push('hb-falling')
  return flags
}
