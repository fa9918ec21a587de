import type { SessionUser } from '@shared/types'
import type {
  PasswordChanged,
  SecondFactorEnrolled,
  SecondFactorEnrolment,
  SecondFactorStatus,
  SignInAnswer,
  SignInProviders,
  SignOutAnswer,
} from '@shared/auth/views'
import type { ChangePasswordInput, LoginInput } from '@shared/schemas/auth'
import { api, isApiError, setCsrfToken } from './client'

/** The signed-in user, or null when there is no session (the server answers 401). */
export async function fetchMe(): Promise<SessionUser | null> {
  try {
    return await api.get<SessionUser>('/auth/me')
  } catch (error) {
    if (isApiError(error) && error.status === 401) return null
    throw error
  }
}

/** The user once signed in, or 'second-factor' when an authenticator code is due first. */
export type SignInStep = SessionUser | 'second-factor'

function signedIn(answer: SignInAnswer): SignInStep {
  // The session id is regenerated at sign-in, so the old token no longer matches.
  setCsrfToken(answer.csrfToken)
  if ('secondFactorRequired' in answer) return 'second-factor'
  return answer.secondFactorEnrolmentRequired ? { ...answer.user, secondFactorEnrolmentRequired: true } : answer.user
}

export async function login(input: LoginInput): Promise<SignInStep> {
  return signedIn(await api.post<SignInAnswer>('/auth/login', input))
}

export async function loginSecondFactor(code: string): Promise<SignInStep> {
  return signedIn(await api.post<SignInAnswer>('/auth/login/second-factor', { code }))
}

export function fetchSecondFactorStatus(): Promise<SecondFactorStatus> {
  return api.get<SecondFactorStatus>('/auth/second-factor')
}

export function startSecondFactorEnrolment(): Promise<SecondFactorEnrolment> {
  return api.post<SecondFactorEnrolment>('/auth/second-factor/enrolment')
}

export function confirmSecondFactorEnrolment(code: string): Promise<SecondFactorEnrolled> {
  return api.post<SecondFactorEnrolled>('/auth/second-factor/enrolment/confirm', { code })
}

export function fetchProviders(): Promise<SignInProviders> {
  return api.get<SignInProviders>('/auth/providers')
}

/** Answers where to send the browser to end the directory session too, or null for a local session. */
export async function logout(): Promise<string | null> {
  try {
    const answer = await api.post<SignOutAnswer | undefined>('/auth/logout')
    return answer?.endSessionUrl ?? null
  } finally {
    setCsrfToken(null)
  }
}

export async function changePassword(input: ChangePasswordInput): Promise<SessionUser> {
  const { user, csrfToken } = await api.post<PasswordChanged>('/auth/password', input)
  // A password change ends every session and opens a new one, with its own token.
  setCsrfToken(csrfToken)
  return user
}
