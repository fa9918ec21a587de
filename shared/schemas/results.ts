import * as yup from 'yup'
import { ANALYTES, implausibleValue, isAnalyte, normaliseUnit, unitsFor } from '../pathway/analytes'
import { pastInstantField } from './fields'
import { hbUnitAmbiguity } from '../pathway/hbEntry'

/**
 * One laboratory result as typed in. The unit must be one the lab uses for that analyte, and
 * the value must be plausible in that unit, so a g/dL figure sent as g/L is refused (with a
 * hint) instead of being stored as a catastrophic anaemia. An Hb that could be g/dL or mmol/L
 * needs its unit confirmed; a TSAT typed as a fraction is refused with a hint.
 */
export const createResultSchema = yup.object({
  analyte: yup
    .string()
    .trim()
    .lowercase()
    .oneOf([...ANALYTES], `analyte must be one of ${ANALYTES.join(', ')}`)
    .required('analyte is required'),
  unit: yup
    .string()
    .required('unit is required')
    .max(20, 'unit must be at most 20 characters')
    .transform((v: unknown) => (typeof v === 'string' ? normaliseUnit(v) : v))
    .test('known-unit', function (unit) {
      const analyte: unknown = this.parent.analyte
      if (!isAnalyte(analyte) || unit == null) return true
      const units = unitsFor(analyte)
      return units.includes(unit) || this.createError({ message: `unit for ${analyte} must be one of ${units.join(', ')} (got ${unit})` })
    }),
  value: yup
    .number()
    .typeError('value must be a number')
    .required('value is required')
    .test('plausible', function (value) {
      const { analyte, unit } = this.parent as { analyte: unknown; unit: unknown }
      if (!isAnalyte(analyte) || typeof unit !== 'string' || value == null) return true
      const why = implausibleValue(analyte, unit, value)
      return why === null || this.createError({ message: why })
    }),
  /** An Hb that fits both g/dL and mmol/L is saved only once its unit is confirmed. */
  unitConfirmed: yup
    .boolean()
    .default(false)
    .test('hb-unit-confirmed', function (confirmed) {
      const { analyte, unit, value } = this.parent as { analyte: unknown; unit: unknown; value: unknown }
      if (analyte !== 'hb' || typeof unit !== 'string' || typeof value !== 'number' || confirmed) return true
      const why = hbUnitAmbiguity(value, unit)
      return why === null || this.createError({ message: why })
    }),
  takenAt: pastInstantField('takenAt (when the sample was taken)').required('takenAt (when the sample was taken) is required'),
})
export type CreateResultInput = yup.InferType<typeof createResultSchema>
