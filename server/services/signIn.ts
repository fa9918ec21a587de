import { Op, QueryTypes } from 'sequelize'
import { User, LoginFailure } from '../models/index'
import type { Config } from '../config'
import type { SessionUser } from '../../shared/types'
import { burnPasswordCheck, verifyPassword } from './passwords'
import { toSessionUser } from './users'
import { TooMany } from '../errors'

/** Same words for an unknown e-mail and a wrong password: the answer must not reveal accounts. */
export const BAD_CREDENTIALS = 'E-mail or password is not correct'

function buckets(email: string, ip: string): { account: string; address: string } {
  return { account: `account:${email.toLowerCase()}`, address: `address:${ip}` }
}

async function failuresIn(bucket: string, since: Date): Promise<number> {
  const row = await LoginFailure.findOne({ where: { bucket, windowStartedAt: { [Op.gte]: since } }, raw: true })
  return row?.failures ?? 0
}

async function countFailure(bucket: string, windowStart: Date): Promise<void> {
  const sequelize = LoginFailure.sequelize!
  // One statement, so concurrent failures from several processes all count.
  await sequelize.query(
    `INSERT INTO login_failures (bucket, failures, window_started_at) VALUES (?, 1, NOW())
     ON DUPLICATE KEY UPDATE
       failures = IF(window_started_at < ?, 1, failures + 1),
       window_started_at = IF(window_started_at < ?, NOW(), window_started_at)`,
    { replacements: [bucket, windowStart, windowStart], type: QueryTypes.INSERT },
  )
}

/** Checks the throttle, then the password; throws TooMany while an account or address is locked out. */
export async function checkCredentials(config: Config, email: string, password: string, ip: string): Promise<SessionUser | null> {
  const b = buckets(email, ip)
  const windowStart = new Date(Date.now() - config.login.windowMinutes * 60_000)
  const [byAccount, byAddress] = await Promise.all([failuresIn(b.account, windowStart), failuresIn(b.address, windowStart)])
  if (byAccount >= config.login.maxFailuresPerAccount || byAddress >= config.login.maxFailuresPerAddress) {
    throw new TooMany(
      `Too many failed sign-ins. Wait ${config.login.windowMinutes} minutes and try again, or ask an administrator to reset your password.`,
    )
  }
  const user = await User.findOne({ where: { email: email.toLowerCase() } })
  const ok = user ? user.active && (await verifyPassword(password, user.passwordHash)) : (await burnPasswordCheck(password), false)
  if (!ok || !user) {
    await countFailure(b.account, windowStart)
    await countFailure(b.address, windowStart)
    return null
  }
  await LoginFailure.destroy({ where: { bucket: b.account } })
  await user.update({ lastSignInAt: new Date() })
  return toSessionUser(user)
}

// Second-factor codes share the sign-in throttle. Wrong codes also go in a bucket of their own,
// which a right password does not clear, so password-then-guess cycles cannot reset the count.
function secondFactorBucket(email: string): string {
  return `second-factor:${email.toLowerCase()}`
}

/** Throws TooMany while the account or address is locked out, before any code is checked. */
export async function checkSecondFactorThrottle(config: Config, email: string, ip: string): Promise<void> {
  const b = buckets(email, ip)
  const windowStart = new Date(Date.now() - config.login.windowMinutes * 60_000)
  const [byAccount, byAddress, byCode] = await Promise.all([failuresIn(b.account, windowStart), failuresIn(b.address, windowStart), failuresIn(secondFactorBucket(email), windowStart)])
  if (Math.max(byAccount, byCode) >= config.login.maxFailuresPerAccount || byAddress >= config.login.maxFailuresPerAddress) {
    throw new TooMany(`Too many failed sign-ins. Wait ${config.login.windowMinutes} minutes and try again, or ask an administrator.`)
  }
}

export async function countSecondFactorFailure(config: Config, email: string, ip: string): Promise<void> {
  const b = buckets(email, ip)
  const windowStart = new Date(Date.now() - config.login.windowMinutes * 60_000)
  await countFailure(b.account, windowStart)
  await countFailure(b.address, windowStart)
  await countFailure(secondFactorBucket(email), windowStart)
}

export async function clearSecondFactorFailures(email: string): Promise<void> {
  await LoginFailure.destroy({ where: { bucket: [buckets(email, '').account, secondFactorBucket(email)] } })
}
