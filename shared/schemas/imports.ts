import * as yup from 'yup'
import { LIMITS } from '../limits'
import { ANALYTES } from '../pathway/analytes'
import { DATE_ORDERS, DELIMITERS, MAPPED_FIELDS, MAPPED_FIELD_LABELS, type ColumnMapping } from '../imports/mapping'

export const sourceNameField = yup
  .string()
  .trim()
  .required('source (the laboratory the file comes from) is required')
  .max(80, 'source must be at most 80 characters')
  .matches(/^[\p{L}\p{N} ._()&'-]+$/u, "source may hold letters, digits, spaces and . _ ( ) & ' -")

const columnField = (label: string) =>
  yup.string().trim().required(`the column for ${label} is required`).max(100, `the column for ${label} must be at most 100 characters`)

/** How one laboratory's CSV is read; saved per source and sent with an upload. */
export const columnMappingSchema = yup.object({
  columns: yup
    .object(
      Object.fromEntries(MAPPED_FIELDS.map((f) => [f, columnField(MAPPED_FIELD_LABELS[f])])) as Record<
        (typeof MAPPED_FIELDS)[number],
        ReturnType<typeof columnField>
      >,
    )
    .required('columns is required')
    .test('distinct', 'each field needs its own column', (c) => !c || new Set(Object.values(c)).size === MAPPED_FIELDS.length),
  delimiter: yup
    .string()
    .oneOf([...DELIMITERS], 'delimiter must be a comma, a semicolon or a tab')
    .default(','),
  dateOrder: yup
    .string()
    .oneOf([...DATE_ORDERS], `dateOrder must be one of ${DATE_ORDERS.join(', ')}`)
    .default('iso'),
  // mixed, not object(): an object without a shape would have every code stripped as unknown.
  codes: yup
    .mixed<Record<string, string>>()
    .default(() => ({}))
    .test('known-analytes', function (codes) {
      if (codes == null) return true
      if (typeof codes !== 'object' || Array.isArray(codes))
        return this.createError({ message: 'codes must map each test code to an analyte' })
      const entries = Object.entries(codes)
      if (entries.length > LIMITS.mappingCodes)
        return this.createError({ message: `codes must list at most ${LIMITS.mappingCodes} test codes (got ${entries.length})` })
      for (const [code, analyte] of entries) {
        if (code.length > LIMITS.mappingCodeLength)
          return this.createError({ message: `each test code in codes must be at most ${LIMITS.mappingCodeLength} characters` })
        if (!(ANALYTES as readonly string[]).includes(String(analyte))) {
          return this.createError({ message: `code ${code} must map to one of ${ANALYTES.join(', ')} (got ${String(analyte)})` })
        }
      }
      return true
    }),
})

export function asColumnMapping(v: yup.InferType<typeof columnMappingSchema>): ColumnMapping {
  return {
    columns: v.columns,
    delimiter: v.delimiter as ColumnMapping['delimiter'],
    dateOrder: v.dateOrder as ColumnMapping['dateOrder'],
    codes: (v.codes ?? {}) as ColumnMapping['codes'],
  }
}

const flag = (name: string) => yup.string().oneOf(['true', 'false'], `${name} must be true or false`).default('false')

/** The multipart fields beside the file. */
export const labImportFieldsSchema = yup.object({
  commit: flag('commit'),
  source: sourceNameField,
  mapping: yup
    .string()
    .max(64 * 1024, 'mapping must be at most 64 KB of JSON')
    .optional(),
})

export const fhirImportQuerySchema = yup.object({
  commit: flag('commit'),
  storeValid: flag('storeValid'),
  source: yup.string().trim().max(80, 'source must be at most 80 characters').default('FHIR'),
})

export const saveMappingSchema = yup.object({ mapping: columnMappingSchema.required('mapping is required') })

export const reversalSchema = yup.object({
  reason: yup
    .string()
    .trim()
    .required('reason is required (why the batch is being taken back out)')
    .min(5, 'reason must say why, in at least 5 characters')
    .max(1000, 'reason must be at most 1000 characters'),
})
export type ReversalInput = yup.InferType<typeof reversalSchema>
