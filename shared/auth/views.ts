/** Answers of the sign-in API, shared by server and client. */
import type { SessionUser } from '../types'

export const LOCAL_SIGN_IN_MODES = ['on', 'admins-only', 'off'] as const
export type LocalSignInMode = (typeof LOCAL_SIGN_IN_MODES)[number]

/** GET /api/auth/providers: the ways to sign in offered on the sign-in page. */
export interface SignInProviders {
  local: LocalSignInMode
  /** Null when no directory (OpenID Connect provider) is configured. */
  directory: { name: string; startUrl: string } | null
}

/** Why a directory sign-in was refused; the client's refusal page explains each. */
export const DIRECTORY_REFUSALS = ['no-role', 'deactivated', 'no-email', 'identity-mismatch', 'failed', 'expired', 'cancelled'] as const
export type DirectoryRefusal = (typeof DIRECTORY_REFUSALS)[number]

/** POST /api/auth/login and POST /api/auth/login/second-factor. */
export type SignInAnswer =
  { user: SessionUser; csrfToken: string; secondFactorEnrolmentRequired?: boolean } | { secondFactorRequired: true; csrfToken: string }

/** POST /api/auth/logout: where to send the browser to end the directory session too. */
export interface SignOutAnswer {
  endSessionUrl: string | null
}

/** POST /api/auth/second-factor/enrolment: shown once, while enrolling. */
export interface SecondFactorEnrolment {
  /** An SVG data URL drawn on the server; no outside service sees the secret. */
  qrCodeDataUrl: string
  /** The same secret in base32, for typing into an authenticator by hand. */
  secret: string
}

/** POST /api/auth/second-factor/enrolment/confirm: the recovery codes, shown this once only. */
export interface SecondFactorEnrolled {
  recoveryCodes: string[]
}

/** GET /api/auth/second-factor */
export interface SecondFactorStatus {
  enabled: boolean
  recoveryCodesLeft: number
  required: boolean
}

/** POST /api/auth/password: every other session ended; this one continues under a new token. */
export interface PasswordChanged {
  user: SessionUser
  csrfToken: string
}

/** GET /api/auth/csrf: the token every write sends back in its X-CSRF-Token header. */
export interface CsrfTokenAnswer {
  csrfToken: string
}
