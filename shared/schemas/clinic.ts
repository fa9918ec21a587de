import * as yup from 'yup'
import { LIMITS } from '../limits'
import { DIAGNOSES } from '../clinic/diagnoses'
import { IV_IRON_CAUTIONS } from '../clinic/cautions'

const version = yup.number().typeError('version must be a number').integer().min(1).required('version is required')

export const reviewSchema = yup.object({
  diagnosis: yup
    .string()
    .oneOf([...DIAGNOSES], `Diagnosis must be one of ${DIAGNOSES.join(', ')}`)
    .required('Diagnosis is required'),
  notes: yup.string().trim().max(4000, 'Notes must be at most 4000 characters').nullable().default(null),
  plan: yup.string().trim().required('Plan is required').max(4000, 'Plan must be at most 4000 characters'),
  cardiovascularDisease: yup.boolean().typeError('cardiovascularDisease must be true or false').default(false),
  version,
})
export type ReviewInput = yup.InferType<typeof reviewSchema>

const cautionShape = Object.fromEntries(
  IV_IRON_CAUTIONS.map((c) => [
    c.key,
    yup.boolean().typeError(`${c.question} must be answered yes or no`).required(`Answer: ${c.question}`),
  ]),
) as Record<(typeof IV_IRON_CAUTIONS)[number]['key'], yup.BooleanSchema<boolean>>

export const dosePlanPreviewSchema = yup.object({
  productCode: yup.string().trim().required('Product is required').max(30),
  targetHbGL: yup
    .number()
    .typeError('Target Hb must be a number in g/L')
    .min(100, 'Target Hb must be at least 100 g/L')
    .max(170, 'Target Hb must be at most 170 g/L'),
  firstDoseDate: yup.string().matches(/^\d{4}-\d{2}-\d{2}$/, 'First dose date must be a date (YYYY-MM-DD)'),
})
export type DosePlanPreviewInput = yup.InferType<typeof dosePlanPreviewSchema>

export const prescriptionSchema = dosePlanPreviewSchema.shape({
  firstDoseDate: yup
    .string()
    .required('First dose date is required')
    .matches(/^\d{4}-\d{2}-\d{2}$/, 'First dose date must be a date (YYYY-MM-DD)'),
  /** The doses as shown to the doctor; the server re-checks every one against the caps. */
  doses: yup
    .array(
      yup.object({
        doseMg: yup.number().typeError('Each dose must be a number of mg').positive('Each dose must be more than 0 mg').required(),
        dayOffset: yup.number().typeError('Each dose needs a day').integer().min(0).max(365).required(),
      }),
    )
    .max(LIMITS.prescriptionDoses, `doses must list at most ${LIMITS.prescriptionDoses} doses`)
    .default(undefined),
  // Required for IV products (the server checks the product's route); oral iron has no checklist.
  cautions: yup.object(cautionShape).default(undefined),
  overrideReason: yup.string().trim().max(2000).nullable().default(null),
  version,
})
export type PrescriptionInput = yup.InferType<typeof prescriptionSchema>

export const administrationSchema = yup.object({
  prescriptionId: yup.number().typeError('prescriptionId must be a number').integer().positive().required('Prescription is required'),
  doseMg: yup
    .number()
    .typeError('Dose must be a number of mg')
    .positive('Dose must be more than 0 mg')
    .max(2000, 'Dose must be at most 2000 mg')
    .required('Dose is required'),
  givenAt: yup
    .date()
    .typeError('Given at must be a date and time')
    .required('Given at is required')
    // A few minutes of grace for clocks that disagree.
    .test('not-future', 'Given at cannot be in the future', (v) => !v || v.getTime() <= Date.now() + 5 * 60_000),
  batchNumber: yup.string().trim().required('Batch number is required').max(40, 'Batch number must be at most 40 characters'),
  reaction: yup
    .string()
    .oneOf(['none', 'mild', 'moderate', 'severe'], 'Reaction must be none, mild, moderate or severe')
    .required('Reaction is required'),
  reactionNotes: yup.string().trim().max(2000).nullable().default(null),
  /** Why a dose over a cap or the prescribed total is given anyway. */
  overrideReason: yup.string().trim().max(500, 'Reason must be at most 500 characters').nullable().default(null),
})
export type AdministrationInput = yup.InferType<typeof administrationSchema>

export const readinessActionSchema = yup.object({
  action: yup
    .string()
    .oneOf(['acknowledge', 'request-date-change'], 'Action must be acknowledge or request-date-change')
    .required('Action is required'),
  reason: yup
    .string()
    .trim()
    .max(2000)
    .when('action', {
      is: 'request-date-change',
      then: (s) => s.required('A reason is required to ask for the date to move'),
      otherwise: (s) => s.nullable().default(null),
    }),
})
export type ReadinessActionInput = yup.InferType<typeof readinessActionSchema>
