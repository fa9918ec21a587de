import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import * as OTPAuth from 'otpauth'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { startTestDirectory, type TestDirectory } from '../helpers/directory'
import { AuditEntry, RecoveryCode, User } from '../../server/models/index'

let t: TestApp
let admin: StaffFixture

beforeAll(async () => {
  t = makeTestApp({ ADMIN_SECOND_FACTOR_REQUIRED: 'true', LOGIN_MAX_FAILURES_ACCOUNT: '5' })
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  admin = await makeStaff('admin')
})

/** What an authenticator app shows for this secret, `stepsAhead` periods from now. */
function authenticatorCode(secret: string, stepsAhead = 0): string {
  return new OTPAuth.TOTP({ secret: OTPAuth.Secret.fromBase32(secret), digits: 6, period: 30, algorithm: 'SHA1' }).generate({
    timestamp: Date.now() + stepsAhead * 30_000,
  })
}

async function enrolledAdmin(): Promise<{ secret: string; recoveryCodes: string[] }> {
  const c = new Client(t.app)
  const res = await c.signIn(admin.email, admin.password)
  expect(res.body.secondFactorEnrolmentRequired).toBe(true)
  const enrolment = await c.post('/api/auth/second-factor/enrolment').expect(200)
  const confirmed = await c
    .post('/api/auth/second-factor/enrolment/confirm', { code: authenticatorCode(enrolment.body.secret) })
    .expect(200)
  await c.post('/api/auth/logout').expect(204)
  return { secret: enrolment.body.secret, recoveryCodes: confirmed.body.recoveryCodes }
}

async function passwordStep(): Promise<Client> {
  const c = new Client(t.app)
  const res = await c.signIn(admin.email, admin.password)
  expect(res.status).toBe(200)
  expect(res.body).toEqual({ secondFactorRequired: true, csrfToken: expect.any(String) })
  c.csrf = res.body.csrfToken
  return c
}

describe('TOTP second factor for local accounts', () => {
  it('when an admin signs in with a password and has no authenticator, then everything but enrolment is closed to them', async () => {
    const c = new Client(t.app)
    const res = await c.signIn(admin.email, admin.password)
    expect(res.status).toBe(200)
    expect(res.body.secondFactorEnrolmentRequired).toBe(true)
    const blocked = await c.get('/api/users').expect(403)
    expect(blocked.body.error.code).toBe('second_factor_enrolment_required')
    expect((await c.get('/api/auth/me').expect(200)).body.secondFactorEnrolmentRequired).toBe(true)
    expect((await c.get('/api/auth/second-factor').expect(200)).body).toEqual({ enabled: false, recoveryCodesLeft: 0, required: true })
  })

  it(
    'when the admin enrols, then the QR code is an SVG drawn locally, a wrong code is refused, and a right one opens the app and ' +
      'gives ten recovery codes stored hashed',
    async () => {
      const c = new Client(t.app)
      await c.signIn(admin.email, admin.password)
      const enrolment = await c.post('/api/auth/second-factor/enrolment').expect(200)
      expect(enrolment.body.secret).toMatch(/^[A-Z2-7]{32}$/)
      expect(enrolment.body.qrCodeDataUrl).toMatch(/^data:image\/svg\+xml;base64,/)
      const svg = Buffer.from(enrolment.body.qrCodeDataUrl.split(',')[1], 'base64').toString()
      expect(svg).toMatch(/^<svg/)
      expect(svg).not.toMatch(/https?:\/\/(?!www\.w3\.org)/)
      const wrong = await c
        .post('/api/auth/second-factor/enrolment/confirm', {
          code: '000000' === authenticatorCode(enrolment.body.secret) ? '111111' : '000000',
        })
        .expect(400)
      expect(wrong.body.error.fields.code).toBeTruthy()
      const ok = await c.post('/api/auth/second-factor/enrolment/confirm', { code: authenticatorCode(enrolment.body.secret) }).expect(200)
      expect(ok.body.recoveryCodes).toHaveLength(10)
      expect(new Set(ok.body.recoveryCodes).size).toBe(10)
      await c.get('/api/users').expect(200)
      const stored = await RecoveryCode.findAll({ where: { userId: admin.id }, raw: true })
      expect(stored).toHaveLength(10)
      for (const code of ok.body.recoveryCodes) expect(JSON.stringify(stored)).not.toContain(code.replace(/-/g, ''))
      expect(stored.every((r) => /^[0-9a-f]{64}$/.test(r.codeSha256))).toBe(true)
      expect((await c.get('/api/auth/second-factor').expect(200)).body).toEqual({ enabled: true, recoveryCodesLeft: 10, required: false })
      expect(await AuditEntry.count({ where: { action: 'enrol-second-factor', userId: admin.id } })).toBe(1)
    },
  )

  it(
    'when an enrolled user gives the password, then nothing is open until the authenticator code is right, and a code cannot be ' +
      'used twice',
    async () => {
      const { secret } = await enrolledAdmin()
      const c = await passwordStep()
      await c.get('/api/auth/me').expect(401)
      const wrong = await c.post('/api/auth/login/second-factor', { code: '12345' }).expect(401)
      expect(wrong.body.error.code).toBe('invalid_code')
      const code = authenticatorCode(secret, 1)
      const ok = await c.post('/api/auth/login/second-factor', { code }).expect(200)
      expect(ok.body.user).toMatchObject({ id: admin.id, role: 'admin' })
      c.csrf = ok.body.csrfToken
      await c.get('/api/users').expect(200)
      const signIn = await AuditEntry.findOne({ where: { action: 'sign-in', userId: admin.id }, order: [['id', 'DESC']], raw: true })
      expect(signIn?.after).toMatchObject({ via: 'password', secondFactor: 'totp' })
      // The same code again, in a new sign-in: a replay.
      const again = await passwordStep()
      await again.post('/api/auth/login/second-factor', { code }).expect(401)
    },
  )

  it('when a recovery code is used, then it signs in once and never again', async () => {
    const { recoveryCodes } = await enrolledAdmin()
    const c = await passwordStep()
    await c.post('/api/auth/login/second-factor', { code: recoveryCodes[3].toUpperCase() }).expect(200)
    const again = await passwordStep()
    await again.post('/api/auth/login/second-factor', { code: recoveryCodes[3] }).expect(401)
    expect(await RecoveryCode.count({ where: { userId: admin.id, usedAt: null } })).toBe(9)
  })

  it('when wrong codes keep coming, then they count toward the sign-in throttle and a right password no longer resets it', async () => {
    const { secret } = await enrolledAdmin()
    for (let i = 0; i < 5; i += 1) {
      const c = await passwordStep()
      await c.post('/api/auth/login/second-factor', { code: '999999' === authenticatorCode(secret) ? '888888' : '999999' }).expect(401)
    }
    const c = await passwordStep()
    const locked = await c.post('/api/auth/login/second-factor', { code: authenticatorCode(secret, 1) }).expect(429)
    expect(locked.body.error.code).toBe('too_many_attempts')
  })

  it('when the code step comes without a password step, then it is refused and changes nothing', async () => {
    const c = new Client(t.app)
    await c.fetchCsrf()
    const res = await c.post('/api/auth/login/second-factor', { code: '123456' }).expect(401)
    expect(res.body.error.code).toBe('no_pending_sign_in')
    await c.post('/api/auth/login/second-factor', {}).expect(400)
  })

  it('when a nurse signs in with a password, then no second factor is demanded (only admins must enrol)', async () => {
    const nurse = await makeStaff('nurse')
    const c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
    await c.get('/api/worklist').expect(200)
  })
})

describe('LOCAL_SIGN_IN', () => {
  let idp: TestDirectory
  beforeAll(async () => {
    idp = await startTestDirectory([])
  })
  afterAll(async () => {
    await idp.stop()
    t.rebind()
  })

  it('when it is admins-only, then a nurse with the right password is sent to the directory and an admin is let in', async () => {
    const app = makeTestApp({ ...idp.appEnv, LOCAL_SIGN_IN: 'admins-only', ADMIN_SECOND_FACTOR_REQUIRED: 'false' })
    try {
      const nurse = await makeStaff('nurse')
      const refused = await new Client(app.app).signIn(nurse.email, nurse.password)
      expect(refused.status).toBe(403)
      expect(refused.body.error).toMatchObject({
        code: 'local_sign_in_admins_only',
        message: expect.stringMatching(/Sign in with Test Hospital directory/),
      })
      await new Client(app.app).mustSignIn(admin.email, admin.password)
      expect((await new Client(app.app).get('/api/auth/providers').expect(200)).body.local).toBe('admins-only')
    } finally {
      await app.close()
      t.rebind()
    }
  })

  it('when it is off, then nobody signs in with a password, admins included', async () => {
    const app = makeTestApp({ ...idp.appEnv, LOCAL_SIGN_IN: 'off' })
    try {
      const res = await new Client(app.app).signIn(admin.email, admin.password)
      expect(res.status).toBe(403)
      expect(res.body.error.code).toBe('local_sign_in_off')
      expect(await User.count()).toBe(1)
    } finally {
      await app.close()
      t.rebind()
    }
  })

  it('when it is not "on" and no directory is configured, then the server refuses to start', () => {
    expect(() => makeTestApp({ LOCAL_SIGN_IN: 'off', OIDC_ISSUER: '' })).toThrow(/LOCAL_SIGN_IN=off needs OIDC_ISSUER/)
    expect(() => makeTestApp({ LOCAL_SIGN_IN: 'sometimes' })).toThrow(/LOCAL_SIGN_IN must be on, admins-only or off/)
  })
})
