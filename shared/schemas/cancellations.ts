import * as yup from 'yup'
import { optionalText, versionField } from './fields'

/** A surgery-date history row either moves the date or cancels the planned operation. */
export const DATE_CHANGE_KINDS = ['moved', 'cancelled'] as const
export type DateChangeKind = (typeof DATE_CHANGE_KINDS)[number]

/** Why a planned operation was cancelled; 'anaemia' is what the quality report counts as "cancelled for anaemia". */
export const CANCELLATION_REASONS = ['anaemia', 'theatre-capacity', 'patient-choice', 'other-clinical'] as const
export type CancellationReason = (typeof CANCELLATION_REASONS)[number]
export const CANCELLATION_REASON_LABELS: Record<CancellationReason, string> = {
  anaemia: 'Cancelled for anaemia',
  'theatre-capacity': 'Theatre capacity',
  'patient-choice': 'Patient choice',
  'other-clinical': 'Another clinical reason',
}

export const cancelOperationSchema = yup.object({
  version: versionField,
  reason: yup
    .string()
    .oneOf([...CANCELLATION_REASONS], `reason must be one of ${CANCELLATION_REASONS.join(', ')}`)
    .required('reason (why the operation is cancelled) is required'),
  note: optionalText('Note on the cancellation', 1000),
})
export type CancelOperationInput = yup.InferType<typeof cancelOperationSchema>
