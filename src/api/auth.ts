import type { SessionUser } from '@shared/types'
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

export async function logout(): Promise<void> {
  try {
    await api.post<void>('/auth/logout')
  } finally {
    setCsrfToken(null)
  }
}

export async function changePassword(input: ChangePasswordInput): Promise<SessionUser> {
  const { user, csrfToken } = await api.post<{ user: SessionUser; csrfToken: string }>('/auth/password', input)
  // A password change ends every session and opens a new one, with its own token.
  setCsrfToken(csrfToken)
  return user
}
