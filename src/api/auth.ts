import type { SessionUser } from '@shared/types'
import type { SignInProviders, SignOutAnswer } from '@shared/auth/views'
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

export async function login(input: LoginInput): Promise<SessionUser> {
  const { user, csrfToken } = await api.post<{ user: SessionUser; csrfToken: string }>('/auth/login', input)
  // The session id is regenerated at sign-in, so the old token no longer matches.
  setCsrfToken(csrfToken)
  return user
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

export function changePassword(input: ChangePasswordInput): Promise<void> {
  return api.post<void>('/auth/password', input)
}
