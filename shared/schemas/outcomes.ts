import * as yup from 'yup'

/** Complications the service tracks after surgery; 'none' stands alone. */
export const COMPLICATIONS = [
  'infection',
  'acute-kidney-injury',
  'myocardial-injury',
  'thromboembolism',
  'return-to-theatre',
  'none',
] as const
export type Complication = (typeof COMPLICATIONS)[number]

export const TXA_TIMINGS = ['before-incision', 'during-surgery', 'after-surgery'] as const
export const TXA_TIMING_LABELS: Record<(typeof TXA_TIMINGS)[number], string> = {
  'before-incision': 'Before incision',
  'during-surgery': 'During surgery',
  'after-surgery': 'After surgery',
}
const yesNoOrUnknown = (label: string) => yup.boolean().typeError(`${label} must be yes, no or not recorded`).nullable().default(null)

const version = yup.number().typeError('version must be a number').integer().min(1).required('version is required')
const isoDate = (label: string) => yup.string().matches(/^\d{4}-\d{2}-\d{2}$/, `${label} must be a date (YYYY-MM-DD)`)
const units = (label: string) =>
  yup
    .number()
    .typeError(`${label} must be a number`)
    .integer(`${label} must be a whole number of units`)
    .min(0, `${label} cannot be negative`)
    .max(40, `${label} must be at most 40 units`)
    .required(`${label} is required`)
// Hb limits are the edges of what a living patient can have (the form refuses beyond them);
// the narrower expected ranges that only warn are in shared/reports/outcomeWarnings.ts.
const hb = (label: string) =>
  yup
    .number()
    .typeError(`${label} must be a number in g/L`)
    .min(30, `${label} must be at least 30 g/L`)
    .max(220, `${label} must be at most 220 g/L`)

export const outcomeSchema = yup.object({
  surgeryDate: isoDate('Surgery date').required('Surgery date is required'),
  bloodLossMl: yup
    .number()
    .typeError('Blood loss must be a number in mL')
    .integer()
    .min(0, 'Blood loss cannot be negative')
    .max(20000, 'Blood loss must be at most 20000 mL')
    .required('Blood loss is required'),
  unitsCrossmatched: units('Units crossmatched'),
  lowestHbGL: hb('Lowest Hb').required('Lowest Hb is required'),
  dischargeHbGL: hb('Hb at discharge').nullable().default(null),
  lengthOfStayDays: yup
    .number()
    .typeError('Length of stay must be a number of days')
    .integer()
    .min(0, 'Length of stay cannot be negative')
    .max(365, 'Length of stay must be at most 365 days')
    .required('Length of stay is required'),
  complications: yup
    .array(
      yup
        .string()
        .oneOf([...COMPLICATIONS], `Complications must be from: ${COMPLICATIONS.join(', ')}`)
        .required(),
    )
    .min(1, "Complications: choose at least one (or 'none')")
    .required('Complications are required')
    .test('none-alone', "'none' cannot be combined with a complication", (v) => !v || !v.includes('none') || v.length === 1),
  // Blood-saving measures (null = not recorded). Red-cell unit counts are not entered here:
  // they are added up from the transfusion record.
  tranexamicAcidGiven: yesNoOrUnknown('Tranexamic acid given'),
  tranexamicAcidDoseMg: yup
    .number()
    .typeError('Tranexamic acid dose must be a number in mg')
    .integer('Tranexamic acid dose must be whole mg')
    .min(1, 'Tranexamic acid dose must be at least 1 mg')
    .max(5000, 'Tranexamic acid dose must be at most 5000 mg')
    .nullable()
    .default(null)
    .when('tranexamicAcidGiven', { is: true, then: (s) => s.required('Tranexamic acid dose is required when it was given') }),
  tranexamicAcidTiming: yup
    .string()
    .oneOf([...TXA_TIMINGS], `Tranexamic acid timing must be one of ${TXA_TIMINGS.join(', ')}`)
    .nullable()
    .default(null)
    .when('tranexamicAcidGiven', { is: true, then: (s) => s.required('Tranexamic acid timing is required when it was given') }),
  cellSalvageUsed: yesNoOrUnknown('Cell salvage used'),
  cellSalvageReturnedMl: yup
    .number()
    .typeError('Cell salvage volume must be a number in mL')
    .integer()
    .min(0, 'Cell salvage volume cannot be negative')
    .max(10000, 'Cell salvage volume must be at most 10000 mL')
    .nullable()
    .default(null)
    .when('cellSalvageUsed', { is: true, then: (s) => s.required('Volume returned is required when cell salvage was used') }),
  transfusionInformationGiven: yesNoOrUnknown('Transfusion information given'),
  transfusionConsent: yesNoOrUnknown('Consent to transfusion'),
  postOperativeIronGiven: yesNoOrUnknown('Post-operative iron given'),
  version,
})
export type OutcomeInput = yup.InferType<typeof outcomeSchema>

export const followUpSchema = yup.object({
  recheckHbGL: hb('Re-check Hb').required('Re-check Hb is required'),
  recheckDate: isoDate('Re-check date').required('Re-check date is required'),
  ironAfterSurgery: yup.boolean().typeError('Iron after surgery must be yes or no').required('Iron after surgery is required'),
  notes: yup.string().trim().max(4000, 'Notes must be at most 4000 characters').nullable().default(null),
  version,
})
export type FollowUpInput = yup.InferType<typeof followUpSchema>
