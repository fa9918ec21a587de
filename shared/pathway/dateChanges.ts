import type { DateChangeReason } from '../schemas/referrals'
import type { DateChangeKind } from '../schemas/cancellations'

/** One row of an episode's surgery-date history, as the API answers it. */
export interface DateChangeView {
  kind: DateChangeKind
  /** The planned date before the change (for a cancellation: the date that was cancelled). */
  fromDate: string
  /** The new date; null for a cancellation. */
  toDate: string | null
  reason: DateChangeReason
  reasonLabel: string
  note: string | null
  changedAt: string
  changedBy: { id: number; name: string } | null
}
