import * as yup from 'yup'
import { PRIORITIES } from '../pathway/options'
import { STAGES } from '../pathway/stages'
import { WORKLIST_FLAGS } from '../pathway/flags'
import { LIMITS } from '../limits'
import { isoDateField, notAfterToday, notBeforeToday, optionalText, versionField, withinYearsAhead } from './fields'

const id = (label: string) =>
  yup
    .number()
    .typeError(`${label} must be a whole number`)
    .integer(`${label} must be a whole number`)
    .min(1, `${label} must be a whole number`)
const procedureCode = yup.string().trim().uppercase().max(20, 'procedureCode must be at most 20 characters')
const plannedSurgeryDate = isoDateField('Planned surgery date')
  .test(notBeforeToday('Planned surgery date'))
  .test(withinYearsAhead('Planned surgery date'))
/** Why a planned surgery date moved; 'anaemia' is what the quality report counts as "postponed for anaemia". */
export const DATE_CHANGE_REASONS = ['anaemia', 'theatre-capacity', 'patient-choice', 'other-clinical', 'other'] as const
export type DateChangeReason = (typeof DATE_CHANGE_REASONS)[number]
export const DATE_CHANGE_REASON_LABELS: Record<DateChangeReason, string> = {
  anaemia: 'Postponed for anaemia',
  'theatre-capacity': 'Theatre capacity',
  'patient-choice': 'Patient choice',
  'other-clinical': 'Another clinical reason',
  other: 'Other',
}
// The listing date (decision to operate) is in the past or today, and not decades back.
const listingDate = isoDateField('Listing date')
  .test(notAfterToday('Listing date'))
  .nullable()
  .transform((v: unknown) => (v === '' ? null : v))

const priority = yup.string().oneOf([...PRIORITIES], `Priority must be one of ${PRIORITIES.join(', ')}`)

export const createReferralSchema = yup.object({
  patientId: id('patientId').required('patientId is required'),
  procedureCode: procedureCode.required('procedureCode is required (an operation from the catalogue)'),
  surgeonId: id('surgeonId').required('surgeonId is required'),
  plannedSurgeryDate: plannedSurgeryDate.required('Planned surgery date is required'),
  priority: priority.default('routine'),
  referringSource: optionalText('Referring source', 200),
  listingDate: listingDate.default(null),
})
export type CreateReferralInput = yup.InferType<typeof createReferralSchema>

export const updateReferralSchema = yup
  .object({
    version: versionField,
    procedureCode,
    surgeonId: id('surgeonId'),
    plannedSurgeryDate,
    priority,
    referringSource: optionalText('Referring source', 200),
    /** Red-cell antibody screen: true positive, false negative, null not known. */
    redCellAntibodies: yup.boolean().strict().nullable().typeError('redCellAntibodies must be true, false or null (not known)'),
    declinesTransfusion: yup.boolean().strict().typeError('declinesTransfusion must be true or false'),
    listingDate,
    // Required (by the service) whenever the planned surgery date actually moves.
    dateChangeReason: yup.string().oneOf([...DATE_CHANGE_REASONS], `dateChangeReason must be one of ${DATE_CHANGE_REASONS.join(', ')}`),
    dateChangeNote: optionalText('Note on the date change', 1000),
  })
  .test('something-to-change', 'Send at least one field to change besides version', (v) =>
    Object.entries(v).some(([k, x]) => !['version', 'dateChangeReason', 'dateChangeNote'].includes(k) && x !== undefined),
  )
export type UpdateReferralInput = yup.InferType<typeof updateReferralSchema>

export const transitionSchema = yup.object({
  to: yup
    .string()
    .oneOf([...STAGES], `to must be one of ${STAGES.join(', ')}`)
    .required('to (the stage to move to) is required'),
  reason: optionalText('Reason', 1000),
  version: versionField,
})
export type TransitionInput = yup.InferType<typeof transitionSchema>

export const WORKLIST_SORTS = [
  'plannedSurgeryDate',
  '-plannedSurgeryDate',
  'daysToSurgery',
  '-daysToSurgery',
  'latestHb',
  '-latestHb',
  'stage',
  '-stage',
  'familyName',
  '-familyName',
  'priority',
  '-priority',
  'createdAt',
  '-createdAt',
] as const
export type WorklistSort = (typeof WORKLIST_SORTS)[number]
export const WORKLIST_MAX_PAGE_SIZE = 100

/** Query strings give strings or repeated keys; both "a,b" and "?stage=a&stage=b" mean a list. */
const list = (v: unknown) =>
  v == null || v === '' ? undefined : (Array.isArray(v) ? v : String(v).split(',')).map((s) => String(s).trim()).filter(Boolean)

export const worklistQuerySchema = yup
  .object({
    stage: yup
      .array()
      .of(
        yup
          .string()
          .oneOf([...STAGES], `stage must be one of ${STAGES.join(', ')}`)
          .required(),
      )
      .transform((_v: unknown, orig: unknown) => list(orig)),
    flag: yup
      .array()
      .of(
        yup
          .string()
          .oneOf([...WORKLIST_FLAGS], `flag must be one of ${WORKLIST_FLAGS.join(', ')}`)
          .required(),
      )
      .transform((_v: unknown, orig: unknown) => list(orig)),
    priority: yup
      .array()
      .of(
        yup
          .string()
          .oneOf([...PRIORITIES], `priority must be one of ${PRIORITIES.join(', ')}`)
          .required(),
      )
      .transform((_v: unknown, orig: unknown) => list(orig)),
    surgeonId: id('surgeonId'),
    procedureCode,
    from: isoDateField('from'),
    to: isoDateField('to'),
    q: yup.string().trim().max(80, 'q must be at most 80 characters'),
    mine: yup.boolean().typeError('mine must be 1 or 0'),
    sort: yup
      .string()
      .oneOf([...WORKLIST_SORTS], `sort must be one of ${WORKLIST_SORTS.join(', ')}`)
      .default('plannedSurgeryDate'),
    page: yup
      .number()
      .typeError('page must be a whole number')
      .integer('page must be a whole number')
      .min(1, 'page must be 1 or more')
      .max(LIMITS.worklistPage, `page must be at most ${LIMITS.worklistPage}`)
      .default(1),
    pageSize: yup
      .number()
      .typeError('pageSize must be a whole number')
      .integer('pageSize must be a whole number')
      .min(1, 'pageSize must be 1 or more')
      .max(WORKLIST_MAX_PAGE_SIZE, `pageSize must be at most ${WORKLIST_MAX_PAGE_SIZE}`)
      .default(25),
  })
  .test('window', function (v) {
    return !v.from || !v.to || v.from <= v.to || this.createError({ path: 'to', message: 'to must be on or after from' })
  })
export type WorklistQuery = yup.InferType<typeof worklistQuerySchema>

/** GET /api/worklist/counts: the worklist's filters without sorting or paging; `flag` names the tiles. */
export const worklistCountsQuerySchema = worklistQuerySchema.omit(['sort', 'page', 'pageSize'])
export type WorklistCountsQuery = yup.InferType<typeof worklistCountsQuerySchema>
