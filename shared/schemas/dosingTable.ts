import * as yup from 'yup'
import { dosingTableProblems, type DosingTableDraft } from '../clinical/dosingTableBands'

/**
 * A product's own dosing table as the admin saves it, and whether plans use it. The band and
 * cell rules live in one pure function (dosingTableProblems) so the form and the server refuse
 * the same gaps, overlaps and impossible needs, each message naming its band or cell.
 */
// Empty numbers pass here on purpose: dosingTableProblems then names the band or cell they sit in.
const band = yup.object({
  from: yup.number().typeError('A lower bound must be a number').nullable().defined(),
  below: yup.number().typeError('An upper bound must be a number').nullable().defined(),
})

const table = yup
  .object({
    weightBands: yup.array(band).required('Weight bands are required'),
    hbBands: yup.array(band).required('Hb bands are required'),
    needMg: yup
      .array(yup.array(yup.number().typeError('Each need must be a number (mg)').nullable().defined()).required())
      .required('The needs are required'),
    source: yup
      .string()
      .trim()
      .max(300, 'Source must be at most 300 characters')
      .required('Source is required (the product information, its section and date)'),
  })
  .test('dosing-table', 'The dosing table has problems', function check(value) {
    if (!value) return true
    const problems = dosingTableProblems(value as DosingTableDraft)
    if (!problems.length) return true
    return new yup.ValidationError(problems.map((p) => this.createError({ path: p.path, message: p.message })))
  })

export const dosingTableSchema = yup.object({
  dosedByTable: yup.boolean().typeError('Dosed by the table must be true or false').required('Say whether plans use the table'),
  table: table
    .nullable()
    .default(null)
    .when('dosedByTable', {
      is: true,
      then: (s) => s.nonNullable('A product dosed by its table needs the table'),
    }),
})
export type DosingTableInput = yup.InferType<typeof dosingTableSchema>
