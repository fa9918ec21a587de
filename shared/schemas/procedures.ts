import * as yup from 'yup'
import { CLINICAL_LIMITS } from '../clinical'
import { BLOOD_ORDERS } from '../pathway/options'
import { numberInLimit } from './fields'

const code = yup
  .string()
  .trim()
  .uppercase()
  .matches(/^[A-Z0-9-]{2,20}$/, 'code must be 2 to 20 letters, digits or -')
const text = (label: string, max: number) =>
  yup.string().trim().min(1, `${label} is required`).max(max, `${label} must be at most ${max} characters`)
const fields = {
  name: text('Name', 160),
  specialty: text('Specialty', 80),
  // Null until the service has a figure: the projection then refuses instead of guessing.
  expectedBloodLossMl: numberInLimit('Expected blood loss', CLINICAL_LIMITS.bloodLossMl).nullable(),
  transfusionRate: numberInLimit('Transfusion rate', { min: 0, max: 1, unit: '(fraction of patients)' }).nullable(),
  usualBloodOrder: yup.string().oneOf([...BLOOD_ORDERS], `usualBloodOrder must be one of ${BLOOD_ORDERS.join(', ')}`),
  usualUnits: yup
    .number()
    .typeError('usualUnits must be a whole number')
    .integer('usualUnits must be a whole number')
    .min(0, 'usualUnits must be 0 to 10')
    .max(10, 'usualUnits must be 0 to 10'),
  // Where the figures come from: a publication, or "set locally" — never left blank.
  source: text('Source', 200),
  active: yup.boolean().typeError('active must be true or false'),
}

export const createProcedureSchema = yup.object({
  code: code.required('code is required'),
  name: fields.name.required('Name is required'),
  specialty: fields.specialty.required('Specialty is required'),
  expectedBloodLossMl: fields.expectedBloodLossMl,
  transfusionRate: fields.transfusionRate,
  usualBloodOrder: fields.usualBloodOrder.required('usualBloodOrder is required'),
  usualUnits: fields.usualUnits.default(0),
  source: fields.source.required('Source is required (a publication, or "set locally")'),
  active: fields.active.default(true),
})
export type CreateProcedureInput = yup.InferType<typeof createProcedureSchema>

export const updateProcedureSchema = yup
  .object(fields)
  .test('something-to-change', 'Send at least one field to change', (v) => Object.values(v).some((x) => x !== undefined))
export type UpdateProcedureInput = yup.InferType<typeof updateProcedureSchema>
