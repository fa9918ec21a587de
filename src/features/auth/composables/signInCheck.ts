import { ValidationError } from 'yup'
import { loginSchema, type LoginInput } from '@shared/schemas/auth'

export type SignInFields = 'email' | 'password'

/**
 * The sign-in form's check against the shared yup schema the server uses. The page imports this
 * module at the first submit, not with the page: yup and the schema are about 15 kB gzip that the
 * first screen anyone sees does not need until then (issue #19's sign-in budget).
 */
export async function checkSignIn(values: {
  email: string
  password: string
}): Promise<{ ok: true; values: LoginInput } | { ok: false; errors: Partial<Record<SignInFields, string>> }> {
  try {
    return { ok: true, values: await loginSchema.validate(values, { abortEarly: false }) }
  } catch (error) {
    if (!(error instanceof ValidationError)) throw error
    const errors: Partial<Record<SignInFields, string>> = {}
    for (const e of error.inner) {
      if ((e.path === 'email' || e.path === 'password') && !errors[e.path]) errors[e.path] = e.message
    }
    return { ok: false, errors }
  }
}
