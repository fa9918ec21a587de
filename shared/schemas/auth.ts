import * as yup from 'yup'
import { emailField } from './email'

export const PASSWORD_MIN_LENGTH = 12

export const loginSchema = yup.object({
  email: emailField().required('E-mail is required'),
  password: yup.string().required('Password is required').max(200, 'Password must be at most 200 characters'),
})
export type LoginInput = yup.InferType<typeof loginSchema>

/** The part of an address before the @, which a password must not contain (too easy to guess). */
export function emailName(email: string): string {
  return email.split('@')[0]?.toLowerCase() ?? ''
}

/**
 * New password rules. The signed-in user's e-mail comes through yup's context
 * (`{ context: { email } }`) so the client and the server check the same rule.
 */
export const newPasswordField = yup
  .string()
  .required('New password is required')
  .min(PASSWORD_MIN_LENGTH, `New password must be at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(200, 'New password must be at most 200 characters')
  .test('not-email-name', 'New password must not contain your e-mail name', function (value) {
    const email = (this.options.context as { email?: string } | undefined)?.email
    const name = email ? emailName(email) : ''
    return !value || name.length < 3 || !value.toLowerCase().includes(name)
  })

export const changePasswordSchema = yup.object({
  currentPassword: yup.string().required('Current password is required').max(200),
  newPassword: newPasswordField,
})
export type ChangePasswordInput = yup.InferType<typeof changePasswordSchema>

/** A six-digit authenticator code, or one of the recovery codes shown at enrolment. */
export const secondFactorCodeSchema = yup.object({
  code: yup.string().trim().required('Enter the code').max(32, 'That code is too long'),
})
export type SecondFactorCodeInput = yup.InferType<typeof secondFactorCodeSchema>
