import type { StaffAccount } from '../types'

/* The staff accounts API's answers (server/services/users.ts) besides StaffAccount itself (shared/types.ts). */

/** The one-time password an administrator passes on to a new or reset account. */
export interface TemporaryPassword {
  temporaryPassword: string
}

/** POST /api/users: the account and its first, temporary password. */
export interface CreatedUser extends TemporaryPassword {
  user: StaffAccount
}
