import * as yup from 'yup'
import { ROLES } from '../roles'
import { emailField } from './fields'

const roleField = yup.string().oneOf([...ROLES], `Role must be one of ${ROLES.join(', ')}`)

export const createUserSchema = yup.object({
  email: emailField('E-mail', 190).required('E-mail is required'),
  name: yup
    .string()
    .trim()
    .required('Name is required')
    .min(2, 'Name must be at least 2 characters')
    .max(120, 'Name must be at most 120 characters'),
  role: roleField.required('Role is required'),
})
export type CreateUserInput = yup.InferType<typeof createUserSchema>

export const updateUserSchema = yup
  .object({
    name: yup.string().trim().min(2, 'Name must be at least 2 characters').max(120),
    role: roleField,
    active: yup.boolean().typeError('Active must be true or false'),
  })
  .test(
    'something-to-change',
    'Send at least one of name, role or active',
    (v) => v.name !== undefined || v.role !== undefined || v.active !== undefined,
  )
export type UpdateUserInput = yup.InferType<typeof updateUserSchema>
