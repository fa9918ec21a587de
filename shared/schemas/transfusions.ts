import * as yup from 'yup'
import { COMPONENTS, isIsbt128ProductCode, MAX_UNITS, PHASES } from '../transfusion/rules'
import { optionalText, pastInstantField } from './fields'

// Hb limits are the edges of what a living patient can have, as on the post-operative record.
const hb = (label: string) =>
  yup
    .number()
    .typeError(`${label} must be a number in g/L`)
    .min(30, `${label} must be at least 30 g/L`)
    .max(220, `${label} must be at most 220 g/L`)
const yesNo = (label: string) => yup.boolean().typeError(`${label} must be yes or no`).required(`${label} is required (yes or no)`)

const fields = {
  givenAt: pastInstantField('Given at').required('Given at is required'),
  phase: yup
    .string()
    .oneOf([...PHASES], `Phase must be one of ${PHASES.join(', ')}`)
    .optional(),
  component: yup
    .string()
    .oneOf([...COMPONENTS], `Component must be one of ${COMPONENTS.join(', ')}`)
    .required('Component is required'),
  units: yup
    .number()
    .typeError('Units must be a number')
    .integer('Units must be a whole number')
    .min(1, `Units must be from 1 to ${MAX_UNITS}`)
    .max(MAX_UNITS, `Units must be from 1 to ${MAX_UNITS}`)
    .required('Units is required'),
  // Red cells are given against a threshold, so their pre-transfusion Hb is required.
  preTransfusionHbGL: hb('Pre-transfusion Hb')
    .nullable()
    .default(null)
    .when('component', { is: 'red-cells', then: (s) => s.required('Pre-transfusion Hb is required for red cells') }),
  reassessedBeforeNext: yesNo('Reassessed before the next unit'),
  postTransfusionHbGL: hb('Post-transfusion Hb').nullable().default(null),
  informationGiven: yesNo('Information given'),
  productCodes: yup
    .array(
      yup
        .string()
        .trim()
        .required()
        .test(
          'isbt',
          ({ value }) => `Product code ${String(value)} is not an ISBT 128 product code (e.g. E0336V00)`,
          (v) => v == null || isIsbt128ProductCode(v),
        ),
    )
    .max(MAX_UNITS, `At most ${MAX_UNITS} product codes`)
    .default([]),
  reason: optionalText('Reason', 1000),
}

const why = (what: string) =>
  yup
    .string()
    .trim()
    .min(3, `Give the reason for ${what} (at least 3 characters)`)
    .max(1000, 'Reason must be at most 1000 characters')
    .required(`A reason for ${what} is required`)

/** A new transfusion adds a row; it cannot clash with anyone else's, so it carries no version. */
export const transfusionSchema = yup.object(fields)
export type TransfusionInput = yup.InferType<typeof transfusionSchema>

/** A correction replaces the row's values and says why (kept in the audit trail). */
export const editTransfusionSchema = yup.object({ ...fields, changeReason: why('the correction') })
export type EditTransfusionInput = yup.InferType<typeof editTransfusionSchema>

export const voidTransfusionSchema = yup.object({ reason: why('voiding') })
export type VoidTransfusionInput = yup.InferType<typeof voidTransfusionSchema>
