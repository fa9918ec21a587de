import * as yup from 'yup'

/** Admin edits to the clinic's thresholds; every key optional, ranges kept clinically sane. */
export const clinicSettingsSchema = yup
  .object({
    anaemiaCriteria: yup.string().oneOf(['who', 'surgical'], 'Anaemia criteria must be who or surgical'),
    transfusionTriggerGL: yup
      .number()
      .typeError('Transfusion trigger must be a number in g/L')
      .min(60, 'Transfusion trigger must be at least 60 g/L')
      .max(100, 'Transfusion trigger must be at most 100 g/L'),
    cardiovascularTriggerGL: yup
      .number()
      .typeError('Cardiovascular trigger must be a number in g/L')
      .min(60)
      .max(110, 'Cardiovascular trigger must be at most 110 g/L'),
    ironTargetHbGL: yup
      .number()
      .typeError('Iron target Hb must be a number in g/L')
      .min(110, 'Iron target Hb must be at least 110 g/L')
      .max(160, 'Iron target Hb must be at most 160 g/L'),
    recheckDaysAfterLastDose: yup
      .number()
      .typeError('Re-check interval must be a number of days')
      .integer()
      .min(7, 'Re-check interval must be at least 7 days')
      .max(56, 'Re-check interval must be at most 56 days'),
    defaultSaO2: yup
      .number()
      .typeError('Default SaO2 must be a fraction')
      .min(0.7, 'Default SaO2 must be at least 0.70')
      .max(1, 'Default SaO2 is a fraction: at most 1'),
    defaultPaO2MmHg: yup.number().typeError('Default PaO2 must be in mmHg').min(40).max(600),
    defaultCardiacIndexLMinM2: yup.number().typeError('Cardiac index must be in L/min/m²').min(1.5).max(6),
    weightMaxAgeDays: yup.number().typeError('Weight age must be a number of days').integer().min(7).max(365),
    resultMaxAgeDays: yup
      .number()
      .typeError('Result age must be a whole number of days')
      .integer('Result age must be a whole number of days')
      .min(7, 'Result age must be at least 7 days')
      .max(365, 'Result age must be at most 365 days'),
    ironStudiesMaxAgeDays: yup
      .number()
      .typeError('Iron studies age must be a whole number of days')
      .integer('Iron studies age must be a whole number of days')
      .min(7, 'Iron studies age must be at least 7 days')
      .max(365, 'Iron studies age must be at most 365 days'),
  })
  .noUnknown(true, 'Unknown setting: ${unknown}')
  // Unknown keys are stripped before noUnknown sees them: an empty edit must not count as a change.
  .test('something-to-change', 'Send at least one setting to change', (v) => Object.values(v ?? {}).some((x) => x !== undefined))
export type ClinicSettingsInput = yup.InferType<typeof clinicSettingsSchema>
