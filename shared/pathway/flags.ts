import { PRE_OPERATIVE_STAGES, type Stage } from './stages'
import { daysBetween } from './dates'

/** Worklist flags: conditions the service wants to see before they become problems. */
export const WORKLIST_FLAGS = ['surgery-soon-anaemic', 'no-screening-result', 'recheck-overdue', 'treatment-not-given', 'date-change-requested'] as const
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
}

/**
 * Screening should be done at least 28 days before surgery (Muñoz 2017, from memory), so an
 * anaemic patient inside that window is the case the clinic must act on first.
 */
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
}

function dayOf(at: Date | string): string {
  return (typeof at === 'string' ? new Date(at) : at).toISOString().slice(0, 10)
}

/**
 * The flags raised for one referral on a given day. Flags only apply before surgery. The
 * server's worklist filter expresses the same rules in SQL (services/worklist.ts); the API
 * tests hold the two together.
 */
export function referralFlags(r: FlagInput, todayIso: string): WorklistFlag[] {
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
    (r.latestHbAt == null || dayOf(r.latestHbAt) < r.recheckDueDate)
  ) {
    flags.push('recheck-overdue')
  }
  if (r.treatmentOrderedAt != null && r.treatmentGivenAt == null) flags.push('treatment-not-given')
  if (r.dateChangeRequestedAt != null) flags.push('date-change-requested')
  return flags
}
