import * as yup from 'yup'

const OUTCOMES = ['stored', 'nothing-new', 'error', 'rejected'] as const

/** The Interfaces screen's message search. */
export const hl7MessageQuerySchema = yup.object({
  q: yup.string().trim().max(100, 'q must be at most 100 characters'),
  outcome: yup.string().oneOf([...OUTCOMES], `outcome must be one of ${OUTCOMES.join(', ')}`),
  attention: yup.boolean().typeError('attention must be true or false'),
  page: yup
    .number()
    .typeError('page must be a whole number')
    .integer('page must be a whole number')
    .min(1, 'page must be 1 or more')
    .default(1),
  pageSize: yup
    .number()
    .typeError('pageSize must be a whole number')
    .integer('pageSize must be a whole number')
    .min(1, 'pageSize must be 1 or more')
    .max(100, 'pageSize must be at most 100')
    .default(25),
})
export type Hl7MessageQuery = yup.InferType<typeof hl7MessageQuerySchema>
