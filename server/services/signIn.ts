import { createHash } from 'node:crypto'
import { QueryTypes } from 'sequelize'
import { User, LoginFailure } from '../models/index'
import type { Config } from '../config'
import type { SessionUser } from '../../shared/types'
import { passwordAccepted } from './credentials'
import { toSessionUser } from './users'
import { TooMany } from '../errors'
import { unitOfWork } from '../unitOfWork'

/** Same words for an unknown e-mail and a wrong password: the answer must not reveal accounts. */
export const BAD_CREDENTIALS = 'E-mail or password is not correct'

/**
 * The account bucket holds a hash of the address: whatever was typed (even 10,000 characters)
 * fits the key, and the table never holds the addresses people tried.
 */
function accountBucket(email: unknown): string | null {
  if (typeof email !== 'string' || email.trim() === '') return null
  return `account:${createHash('sha256').update(email.trim().toLowerCase()).digest('hex')}`
}
const addressBucket = (ip: string) => `address:${ip.slice(0, 200)}`

/**
 * Adds one to a bucket and reads the new count in the same transaction: the row lock serialises
 * parallel attempts, so each sees its own number and no more than the limit get through.
 */
async function bump(bucket: string, windowStart: Date): Promise<number> {
  const sequelize = LoginFailure.sequelize!
  return unitOfWork(sequelize, { idempotent: true }, async (transaction) => {
    await sequelize.query(
      `INSERT INTO login_failures (bucket, failures, window_started_at) VALUES (?, 1, NOW())
       ON DUPLICATE KEY UPDATE
         failures = IF(window_started_at < ?, 1, failures + 1),
         window_started_at = IF(window_started_at < ?, NOW(), window_started_at)`,
      { replacements: [bucket, windowStart, windowStart], type: QueryTypes.INSERT, transaction },
    )
    const rows = await sequelize.query<{ failures: number }>('SELECT failures FROM login_failures WHERE bucket = ?', {
      replacements: [bucket],
      type: QueryTypes.SELECT,
      transaction,
    })
    return Number(rows[0]?.failures ?? 0)
  })
}

/**
 * Counts a sign-in attempt before anything else looks at it (its shape, its password), as a
 * failure until proven otherwise; throws TooMany past the limit of the account or the address.
 */
export async function countSignInAttempt(config: Config, email: unknown, ip: string): Promise<void> {
  const windowStart = new Date(Date.now() - config.login.windowMinutes * 60_000)
  const account = accountBucket(email)
  const byAddress = await bump(addressBucket(ip), windowStart)
  const byAccount = account ? await bump(account, windowStart) : 0
  if (byAccount > config.login.maxFailuresPerAccount || byAddress > config.login.maxFailuresPerAddress) {
    throw new TooMany(
      `Too many failed sign-ins. Wait ${config.login.windowMinutes} minutes and try again, or ask an administrator to reset your password.`,
    )
  }
}

/** Checks the password of an attempt already counted; a success takes the attempt back off the counts. */
export async function checkCredentials(email: string, password: string, ip: string): Promise<SessionUser | null> {
  const user = await User.findOne({ where: { email: email.toLowerCase() } })
  const ok = await passwordAccepted(user, password)
  if (!ok || !user) return null
  await LoginFailure.destroy({ where: { bucket: accountBucket(email)! } })
  await LoginFailure.sequelize!.query('UPDATE login_failures SET failures = GREATEST(failures, 1) - 1 WHERE bucket = ?', {
    replacements: [addressBucket(ip)],
    type: QueryTypes.UPDATE,
  })
  await user.update({ lastSignInAt: new Date() })
  return toSessionUser(user)
}

// Second-factor codes share the sign-in throttle. The throttle middleware has already counted
// this request against the address (it guards every /auth/login path); wrong codes also go in the
// account's bucket and in one of their own, which a right password does not clear, so
// password-then-guess cycles cannot reset the count.
function secondFactorBucket(email: string): string {
  return `second-factor:${createHash('sha256').update(email.trim().toLowerCase()).digest('hex')}`
}

async function failuresIn(bucket: string, windowStart: Date): Promise<number> {
  const rows = await LoginFailure.sequelize!.query<{ failures: number }>(
    'SELECT failures FROM login_failures WHERE bucket = ? AND window_started_at >= ?',
    { replacements: [bucket, windowStart], type: QueryTypes.SELECT },
  )
  return Number(rows[0]?.failures ?? 0)
}

/** Throws TooMany while the account, its codes or the address are locked out, before any code is checked. */
export async function checkSecondFactorThrottle(config: Config, email: string, ip: string): Promise<void> {
  const windowStart = new Date(Date.now() - config.login.windowMinutes * 60_000)
  const [byAccount, byAddress, byCode] = await Promise.all([
    failuresIn(accountBucket(email)!, windowStart),
    failuresIn(addressBucket(ip), windowStart),
    failuresIn(secondFactorBucket(email), windowStart),
  ])
  if (Math.max(byAccount, byCode) >= config.login.maxFailuresPerAccount || byAddress > config.login.maxFailuresPerAddress) {
    throw new TooMany(`Too many failed sign-ins. Wait ${config.login.windowMinutes} minutes and try again, or ask an administrator.`)
  }
}

/** A wrong code: one more failure for the account and for the account's codes. */
export async function countSecondFactorFailure(config: Config, email: string): Promise<void> {
  const windowStart = new Date(Date.now() - config.login.windowMinutes * 60_000)
  await bump(accountBucket(email)!, windowStart)
  await bump(secondFactorBucket(email), windowStart)
}

/** A right code: the account's failures are cleared and this attempt comes back off the address. */
export async function clearSecondFactorFailures(email: string, ip: string): Promise<void> {
  await LoginFailure.destroy({ where: { bucket: [accountBucket(email)!, secondFactorBucket(email)] } })
  await LoginFailure.sequelize!.query('UPDATE login_failures SET failures = GREATEST(failures, 1) - 1 WHERE bucket = ?', {
    replacements: [addressBucket(ip)],
    type: QueryTypes.UPDATE,
  })
}
