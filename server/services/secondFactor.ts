/**
 * TOTP second factor for local accounts (RFC 6238 through `otpauth`): enrolment shows the secret
 * as a QR code drawn here (no outside service sees it), confirmation stores it and issues ten
 * recovery codes that are shown once and kept only as SHA-256 digests.
 */
import { createHash, randomBytes } from 'node:crypto'
import type { Sequelize } from 'sequelize'
import * as OTPAuth from 'otpauth'
import { RecoveryCode, User } from '../models/index'
import { recordAudit, type Actor } from './audit'
import { Invalid, NotFound } from '../errors'
import type { SecondFactorEnrolled, SecondFactorEnrolment } from '../../shared/auth/views'

const PERIOD_SECONDS = 30
const RECOVERY_CODES = 10

function totpFor(secretBase32: string, email: string): OTPAuth.TOTP {
  return new OTPAuth.TOTP({
    issuer: 'Ferrolane',
    label: email,
    algorithm: 'SHA1',
    digits: 6,
    period: PERIOD_SECONDS,
    secret: OTPAuth.Secret.fromBase32(secretBase32),
  })
}

/** The 30-second step a code belongs to, or null; one step either side allows for clock drift. */
function matchingStep(secretBase32: string, email: string, code: string): number | null {
  if (!/^\d{6}$/.test(code)) return null
  const delta = totpFor(secretBase32, email).validate({ token: code, window: 1 })
  return delta === null ? null : Math.floor(Date.now() / 1000 / PERIOD_SECONDS) + delta
}

const digest = (code: string) => createHash('sha256').update(code.replace(/[\s-]/g, '').toLowerCase()).digest('hex')

function recoveryCode(): string {
  const alphabet = 'abcdefghjkmnpqrstuvwxyz23456789'
  const chars = [...randomBytes(12)].map((b) => alphabet[b % alphabet.length])
  return [0, 4, 8].map((i) => chars.slice(i, i + 4).join('')).join('-')
}

export async function hasSecondFactor(userId: number): Promise<boolean> {
  const u = await User.findByPk(userId, { attributes: ['totpEnabledAt'], raw: true })
  return Boolean(u?.totpEnabledAt)
}

export async function secondFactorStatus(userId: number): Promise<{ enabled: boolean; recoveryCodesLeft: number }> {
  const [enabled, left] = await Promise.all([hasSecondFactor(userId), RecoveryCode.count({ where: { userId, usedAt: null } })])
  return { enabled, recoveryCodesLeft: enabled ? left : 0 }
}

/** A fresh secret for the session to hold until the person proves their authenticator has it. */
export async function beginEnrolment(email: string): Promise<SecondFactorEnrolment> {
  const secret = new OTPAuth.Secret({ size: 20 }).base32
  const uri = totpFor(secret, email).toString()
  // Loaded on the first enrolment, which most staff make once.
  const { default: QRCode } = await import('qrcode')
  const svg = await QRCode.toString(uri, { type: 'svg', errorCorrectionLevel: 'M', margin: 2 })
  return { secret, qrCodeDataUrl: `data:image/svg+xml;base64,${Buffer.from(svg).toString('base64')}` }
}

export async function confirmEnrolment(
  sequelize: Sequelize,
  actor: Actor & { userId: number },
  secret: string,
  code: string,
): Promise<SecondFactorEnrolled> {
  const user = await User.findByPk(actor.userId)
  if (!user) throw new NotFound('Account')
  const step = matchingStep(secret, user.email, code)
  if (step === null)
    throw new Invalid('That code does not match; check the authenticator shows Ferrolane and try the newest code', {
      code: 'does not match',
    })
  const codes = Array.from({ length: RECOVERY_CODES }, recoveryCode)
  await sequelize.transaction(async (t) => {
    await user.update({ totpSecret: secret, totpEnabledAt: new Date(), totpLastStep: step }, { transaction: t })
    await RecoveryCode.destroy({ where: { userId: user.id }, transaction: t })
    await RecoveryCode.bulkCreate(
      codes.map((c) => ({ userId: user.id, codeSha256: digest(c) })),
      { transaction: t },
    )
    await recordAudit(t, actor, {
      action: 'enrol-second-factor',
      entity: 'user',
      entityId: user.id,
      after: { method: 'totp', recoveryCodes: RECOVERY_CODES },
    })
  })
  return { recoveryCodes: codes }
}

/** Checks an authenticator code (each used once) or a recovery code (each used once). */
export async function verifySecondFactor(sequelize: Sequelize, userId: number, code: string): Promise<'totp' | 'recovery-code' | null> {
  return sequelize.transaction(async (t) => {
    const user = await User.findByPk(userId, { transaction: t, lock: t.LOCK.UPDATE })
    if (!user?.totpSecret || !user.active) return null
    const step = matchingStep(user.totpSecret, user.email, code.trim())
    if (step !== null) {
      // A code already accepted (or an older one) is a replay.
      if (user.totpLastStep !== null && step <= Number(user.totpLastStep)) return null
      await user.update({ totpLastStep: step }, { transaction: t })
      return 'totp'
    }
    const row = await RecoveryCode.findOne({
      where: { userId, codeSha256: digest(code), usedAt: null },
      transaction: t,
      lock: t.LOCK.UPDATE,
    })
    if (!row) return null
    await row.update({ usedAt: new Date() }, { transaction: t })
    return 'recovery-code'
  })
}
