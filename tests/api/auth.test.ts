import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { SessionRow, AuditEntry } from '../../server/models/index'

let t: TestApp
let nurse: StaffFixture

beforeAll(async () => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  nurse = await makeStaff('nurse', { name: 'Nina Nurse' })
})

function sessionCookie(res: { headers: Record<string, unknown> }): string | undefined {
  const cookies = (res.headers['set-cookie'] as string[] | undefined) ?? []
  return cookies.find((c) => c.startsWith('ferrolane.sid='))
}

describe('sign-in and sign-out', () => {
  it('when the password is right, then the user is returned and /me knows them', async () => {
    const c = new Client(t.app)
    const res = await c.signIn(nurse.email, nurse.password)
    expect(res.status).toBe(200)
    expect(res.body.user).toEqual({ id: nurse.id, email: nurse.email, name: 'Nina Nurse', role: 'nurse', mustChangePassword: false })
    expect(typeof res.body.csrfToken).toBe('string')
    const me = await c.get('/api/auth/me').expect(200)
    expect(me.body).toMatchObject({ id: nurse.id, email: nurse.email, name: 'Nina Nurse', role: 'nurse' })
  })

  it('when the e-mail is unknown or the password wrong, then both answer 401 with the same message', async () => {
    const wrong = await new Client(t.app).signIn(nurse.email, 'not-the-password-at-all')
    const unknown = await new Client(t.app).signIn('nobody@hospital.test', 'not-the-password-at-all')
    expect(wrong.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(wrong.body.error.message).toBe(unknown.body.error.message)
    expect(wrong.body.error.code).toBe('invalid_credentials')
  })

  it('when a user signs in, then the session id is regenerated and the cookie is httpOnly and SameSite=Lax', async () => {
    const c = new Client(t.app)
    const before = await c.agent.get('/api/auth/csrf')
    c.csrf = before.body.csrfToken
    const after = await c.signIn(nurse.email, nurse.password)
    const a = sessionCookie(before)!
    const b = sessionCookie(after)!
    expect(a.split(';')[0]).not.toBe(b.split(';')[0])
    expect(b).toMatch(/HttpOnly/i)
    expect(b).toMatch(/SameSite=Lax/i)
    expect(b).not.toMatch(/Secure/) // plain http on loopback; COOKIE_SECURE turns it on behind TLS
  })

  it('when COOKIE_SECURE is set, then the session cookie is marked Secure', async () => {
    const secure = makeTestApp({ COOKIE_SECURE: 'true', TRUST_PROXY: '1' })
    try {
      const c = new Client(secure.app)
      const csrf = await c.agent.get('/api/auth/csrf').set('X-Forwarded-Proto', 'https')
      expect(sessionCookie(csrf)).toMatch(/;\s*Secure/i)
    } finally {
      await secure.close()
      t.rebind()
    }
  })

  it('when the user signs out, then the session is destroyed and /me answers 401', async () => {
    const c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
    expect(await SessionRow.count({ where: { userId: nurse.id } })).toBe(1)
    await c.post('/api/auth/logout').expect(204)
    expect(await SessionRow.count({ where: { userId: nurse.id } })).toBe(0)
    await c.get('/api/auth/me').expect(401)
  })

  it('when the session has been idle past its timeout, then it no longer signs anyone in', async () => {
    const c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
    await SessionRow.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: nurse.id } })
    await c.get('/api/auth/me').expect(401)
  })

  it('when the server restarts, then an open session still works (sessions live in MariaDB)', async () => {
    const c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
    const cookie = (await c.get('/api/auth/me')).request.cookies
    await t.close()
    t = makeTestApp() // a new process in all but name: new app, new pool, same database
    const res = await (await import('supertest')).default(t.app).get('/api/auth/me').set('Cookie', cookie)
    expect(res.status).toBe(200)
    expect(res.body.email).toBe(nurse.email)
  })

  it('when sign-in succeeds, then an audit row records it', async () => {
    await new Client(t.app).mustSignIn(nurse.email, nurse.password)
    const rows = await AuditEntry.findAll({ where: { userId: nurse.id, action: 'sign-in' }, raw: true })
    expect(rows).toHaveLength(1)
  })
})

describe('CSRF', () => {
  it('when a POST has no CSRF token, then it is refused with 403 and changes nothing', async () => {
    const c = new Client(t.app)
    await c.fetchCsrf()
    const res = await c.agent.post('/api/auth/login').send({ email: nurse.email, password: nurse.password })
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('csrf_invalid')
    await c.get('/api/auth/me').expect(401)
  })

  it('when a POST carries a token from another session, then it is refused', async () => {
    const other = new Client(t.app)
    const token = await other.fetchCsrf()
    const c = new Client(t.app)
    await c.fetchCsrf()
    const res = await c.agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: nurse.email, password: nurse.password })
    expect(res.status).toBe(403)
  })
})

describe('throttling', () => {
  it('when an account has 5 failed sign-ins, then even the right password answers 429 with a clear message', async () => {
    const c = new Client(t.app)
    for (let i = 0; i < 5; i++) expect((await c.signIn(nurse.email, 'wrong-password-' + i)).status).toBe(401)
    const res = await c.signIn(nurse.email, nurse.password)
    expect(res.status).toBe(429)
    expect(res.body.error.message).toMatch(/Too many failed sign-ins/)
  })

  it('when one address fails on many accounts, then that address is throttled', async () => {
    const strict = makeTestApp({ LOGIN_MAX_FAILURES_ADDRESS: '3' })
    try {
      const c = new Client(strict.app)
      for (let i = 0; i < 3; i++) await c.signIn(`someone${i}@hospital.test`, 'wrong-password-x')
      const res = await c.signIn(nurse.email, nurse.password)
      expect(res.status).toBe(429)
    } finally {
      await strict.close()
      t.rebind()
    }
  })
})

describe('validation and errors', () => {
  it('when the e-mail is not an address, then the 400 names the field and the rule', async () => {
    const c = new Client(t.app)
    await c.fetchCsrf()
    const res = await c.post('/api/auth/login', { email: 'not-an-email', password: 'x' })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('invalid_input')
    expect(res.body.error.fields.email).toMatch(/valid address/)
    expect(res.body.error.message).toMatch(/E-mail/)
  })

  it('when the body is not JSON, then the answer is a 400 in the error shape', async () => {
    const c = new Client(t.app)
    await c.fetchCsrf()
    const res = await c.agent.post('/api/auth/login').set('X-CSRF-Token', c.csrf).set('Content-Type', 'application/json').send('{oops')
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('invalid_json')
  })

  it('when an API route does not exist, then it answers 404 in the error shape', async () => {
    const res = await new Client(t.app).get('/api/nothing-here')
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('not_found')
  })

  it('then every response carries a Content-Security-Policy with no third-party origin', async () => {
    const res = await new Client(t.app).get('/api/health')
    const csp = res.headers['content-security-policy'] as string
    expect(csp).toContain("default-src 'self'")
    expect(csp).toContain("script-src 'self'")
    expect(csp).not.toMatch(/https?:\/\//)
  })
})
