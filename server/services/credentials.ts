import type { User } from '../models/index'
import { AppError } from '../errors'
import { burnPasswordCheck, hashPassword, needsRehash, verifyPassword } from './passwords'

type UserRow = InstanceType<typeof User>

/**
 * The password half of signing in. Every path pays one full hash, so the answer time does not
 * tell an unknown e-mail, a deactivated account and a wrong password apart (ASVS 2.2.1, 3.7.1).
 * True only for an active account whose password matches; an expired temporary password is
 * refused in words, since the caller has just proved they know it.
 */
export async function passwordAccepted(user: UserRow | null, password: string, now = new Date()): Promise<boolean> {
  if (!user) {
    await burnPasswordCheck(password)
    return false
  }
  const matches = await verifyPassword(password, user.passwordHash)
  if (!matches || !user.active) return false
  if (user.mustChangePassword && user.temporaryPasswordExpiresAt && user.temporaryPasswordExpiresAt <= now) {
    throw new AppError(
      'temporary_password_expired',
      'This temporary password has expired. Ask an administrator to reset your password again.',
      401,
    )
  }
  // A hash made at an older, cheaper cost is replaced now that the plain password is at hand.
  if (needsRehash(user.passwordHash)) await user.update({ passwordHash: await hashPassword(password) })
  return true
}
