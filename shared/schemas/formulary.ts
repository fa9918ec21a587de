import * as yup from 'yup'
import { CLINICAL_LIMITS } from '../clinical'

const L = CLINICAL_LIMITS
const capField = (label: string, limit: { min: number; max: number; unit: string }) =>
  yup
    .number()
    .typeError(`${label} must be a number (${limit.unit})`)
    .min(limit.min, `${label} must be at least ${limit.min} ${limit.unit}`)
    .max(limit.max, `${label} must be at most ${limit.max} ${limit.unit}`)

const productFields = {
  name: yup.string().trim().min(2).max(120),
  route: yup.string().oneOf(['iv', 'oral'], 'Route must be iv or oral'),
  maxSingleDoseMg: capField('Largest single dose', L.productMaxSingleDoseMg),
  maxSingleDoseMgPerKg: capField('Largest dose per kg', L.productMaxSingleDoseMgPerKg).nullable(),
  minIntervalDays: capField('Minimum interval', L.productMinIntervalDays).integer('Minimum interval must be whole days'),
  maxWeeklyMg: capField('Largest weekly total', L.productMaxWeeklyMg).nullable(),
  maxTotalMg: capField('Largest course total', L.productMaxTotalMg).nullable(),
  roundToMg: capField('Dose step', L.productRoundToMg).nullable(),
  oralDailyMg: capField('Elemental iron per oral dose', L.productOralDailyMg).nullable(),
  oralAlternateDays: yup.boolean().nullable(),
  licensedFromAgeYears: yup
    .number()
    .typeError('Youngest licensed age must be a number of years')
    .min(0, 'Youngest licensed age must be at least 0 years')
    .max(18, 'Youngest licensed age must be at most 18 years')
    .nullable(),
  paediatricMaxSingleDoseMgPerKg: capField('Largest dose per kg under 18', L.productMaxSingleDoseMgPerKg).nullable(),
  paediatricMaxSingleDoseMg: capField('Largest single dose under 18', L.productMaxSingleDoseMg).nullable(),
  phosphateCheckOnRepeat: yup.boolean(),
  source: yup.string().trim().max(300),
  active: yup.boolean(),
}

export const createIronProductSchema = yup.object({
  ...productFields,
  code: yup
    .string()
    .trim()
    .required('Code is required')
    .matches(/^[a-z0-9-]{2,30}$/, 'Code must be 2–30 lower-case letters, digits or hyphens'),
  name: productFields.name.required('Name is required'),
  route: productFields.route.required('Route is required'),
  maxSingleDoseMg: productFields.maxSingleDoseMg.required('Largest single dose is required'),
  minIntervalDays: productFields.minIntervalDays.required('Minimum interval is required'),
  source: productFields.source.required('Source is required (e.g. the prescribing information and its date)'),
})
export type CreateIronProductInput = yup.InferType<typeof createIronProductSchema>

export const updateIronProductSchema = yup.object(productFields)
export type UpdateIronProductInput = yup.InferType<typeof updateIronProductSchema>
