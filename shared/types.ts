import type { Role } from './roles'

/** The signed-in user as the API returns it. */
export interface SessionUser {
  id: number
  email: string
  name: string
  role: Role
  mustChangePassword: boolean
  /** Present (true) while an admin who signed in with a password must first set up an authenticator. */
  secondFactorEnrolmentRequired?: boolean
}

/** A staff account as the admin screen lists it. */
export interface StaffAccount extends SessionUser {
  active: boolean
  lastSignInAt: string | null
  createdAt: string
}

/** The one error shape every API failure answers with. */
export interface ApiErrorBody {
  error: { code: string; message: string; fields?: Record<string, string>; details?: Record<string, unknown> }
}

/** Every list answer of the API: `{ rows: [...] }`, so a list can gain paging without a breaking change. */
export interface Rows<T> {
  rows: T[]
}
