import * as yup from 'yup'
import { CLINICAL_LIMITS } from '../clinical'
import { isoDateField, notAfterToday, numberInLimit, optionalText, pastInstantField, versionField } from './fields'

export const SEXES = ['female', 'male'] as const

const mrn = yup
  .string()
  .trim()
  .uppercase()
  .matches(/^[A-Z0-9]{3,20}$/, 'MRN must be 3 to 20 letters or digits')
const name = (label: string) => yup.string().trim().min(1, `${label} is required`).max(80, `${label} must be at most 80 characters`)
const dateOfBirth = isoDateField('Date of birth')
  .test(notAfterToday('Date of birth'))
  .test(
    'not-too-old',
    'Date of birth must be within the last 120 years',
    (v) => v == null || v >= `${new Date().getFullYear() - 120}-01-01`,
  )
// The published equations (blood volume, eGFR, WHO cut-offs) need one of these two.
const sex = yup.string().oneOf([...SEXES], "Sex must be 'female' or 'male'")
const heightCm = numberInLimit('Height', CLINICAL_LIMITS.heightCm)
const weightKg = numberInLimit('Weight', CLINICAL_LIMITS.weightKg)
const email = optionalText('E-mail', 190).email('E-mail must be a valid address')
const phone = optionalText('Phone', 30).matches(/^[0-9 +()-]{6,30}$/, {
  message: 'Phone must be 6 to 30 digits, spaces, +, ( ) or -',
  excludeEmptyString: true,
})

const contact = {
  email,
  phone,
  gpPractice: optionalText('Family doctor practice', 200),
  notes: optionalText('Notes', 4000),
  /** When the height/weight were measured; defaults to now. */
  measuredAt: pastInstantField('Measured at'),
}

export const createPatientSchema = yup.object({
  mrn: mrn.required('MRN (hospital number) is required'),
  givenName: name('Given name').required('Given name is required'),
  familyName: name('Family name').required('Family name is required'),
  dateOfBirth: dateOfBirth.required('Date of birth is required'),
  sex: sex.required("Sex is required ('female' or 'male')"),
  // Optional at registration: the weight may only be known at pre-assessment.
  heightCm: heightCm.nullable(),
  weightKg: weightKg.nullable(),
  ...contact,
})
export type CreatePatientInput = yup.InferType<typeof createPatientSchema>

export const updatePatientSchema = yup
  .object({
    version: versionField,
    mrn,
    givenName: name('Given name'),
    familyName: name('Family name'),
    dateOfBirth,
    sex,
    // A measurement cannot be un-taken; a new value appends to the history.
    heightCm,
    weightKg,
    ...contact,
  })
  .test('something-to-change', 'Send at least one field to change besides version', (v) =>
    Object.entries(v).some(([k, x]) => k !== 'version' && k !== 'measuredAt' && x !== undefined),
  )
export type UpdatePatientInput = yup.InferType<typeof updatePatientSchema>

export const patientSearchSchema = yup.object({
  q: yup.string().trim().min(2, 'Search must be at least 2 characters').max(80).required('q is required'),
})
