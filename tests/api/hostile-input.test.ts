import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { AuditEntry, Patient } from '../../server/models/index'

// Issue #12, points 2, 3 and 7: the inputs that were measured as 500s, the sign-in throttle
// under parallel attempts, and the audit of reads while a screen polls.
let t: TestApp
let nurse: StaffFixture
let doctor: StaffFixture
let asNurse: Client
let ids: { referralId: number; patientId: number }

beforeAll(async () => {
  // Every test here signs in from 127.0.0.1; only the account limit is under test.
  t = makeTestApp({ LOGIN_MAX_FAILURES_ADDRESS: '1000' })
  await cleanDatabase(t.sequelize)
  nurse = await makeStaff('nurse')
  doctor = await makeStaff('doctor')
  asNurse = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
  const surgeon = await makeStaff('surgeon')
  const { patient, referral } = await makeEpisode({ surgeonId: surgeon.id })
  ids = { referralId: referral.id, patientId: patient.id }
})
afterAll(async () => {
  await t.close()
})

const PROTOTYPE_BODIES = [
  '{"toString":"x"}',
  '{"valueOf":1}',
  '{"hasOwnProperty":1}',
  '{"constructor":{"prototype":{}}}',
  '{"__proto__":{}}',
  '{"mrn":"ABC123","nested":{"isPrototypeOf":1}}',
]

describe('keys named like Object.prototype members', () => {
  it.each(PROTOTYPE_BODIES)('when a patient is registered with %s, then the answer is a 400 and nothing is stored', async (body) => {
    const before = await Patient.count()
    const res = await asNurse.agent
      .post('/api/patients')
      .set('X-CSRF-Token', asNurse.csrf)
      .set('Content-Type', 'application/json')
      .send(body)
    expect(res.status, JSON.stringify(res.body)).toBe(400)
    expect(res.body.error.message).toMatch(/__proto__|constructor|toString|valueOf|hasOwnProperty|isPrototypeOf/)
    expect(await Patient.count()).toBe(before)
  })

  it('when a query string carries one, then the 400 names the key', async () => {
    const res = await asNurse.get('/api/patients?toString=1')
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ toString: 'This field name is not accepted' })
  })

  it('when a multipart field carries one, then the 400 names the key', async () => {
    const res = await asNurse.agent
      .post(`/api/referrals/${ids.referralId}/documents`)
      .set('X-CSRF-Token', asNurse.csrf)
      .field('valueOf', 'x')
      .field('kind', 'other')
      .field('title', 'A letter')
      .attach('file', Buffer.from('%PDF-1.4\n%%EOF\n'), 'a.pdf')
    expect(res.status, JSON.stringify(res.body)).toBe(400)
    expect(res.body.error.message).toContain('valueOf')
  })

  it('when the report CSV asks for the table "__proto__", then the 400 lists the tables', async () => {
    const asDoctor = await new Client(t.app).mustSignIn(doctor.email, doctor.password)
    const res = await asDoctor.get('/api/reports/funnel?format=csv&table=__proto__')
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^table must be one of /)
  })
})

describe('other inputs that were 500s', () => {
  it('when the CSRF header is made of non-ASCII characters, then the answer is 403', async () => {
    const c = new Client(t.app)
    await c.fetchCsrf()
    const res = await c.agent.post('/api/auth/login').set('X-CSRF-Token', 'é'.repeat(32)).send({ email: nurse.email, password: 'x' })
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('csrf_invalid')
  })

  it('when the e-mail is 300 characters long, then the answer is a 400, and the attempt still counts', async () => {
    const c = new Client(t.app)
    const email = `${'a'.repeat(288)}@example.test`
    const statuses: number[] = []
    for (let i = 0; i < 7; i += 1) statuses.push((await c.signIn(email, 'wrong-password-1')).status)
    // Five attempts per account (LOGIN_MAX_FAILURES_ACCOUNT), then the throttle answers first.
    expect(statuses).toEqual([400, 400, 400, 400, 400, 429, 429])
    const res = await c.signIn(email, 'wrong-password-1')
    expect(res.body.error.message).toMatch(/Too many failed sign-ins/)
  })

  it('when 20 wrong passwords arrive at once for one account, then no more than the limit reach the password check', async () => {
    const victim = await makeStaff('doctor')
    const clients = await Promise.all(
      Array.from({ length: 20 }, async () => {
        const c = new Client(t.app)
        await c.fetchCsrf()
        return c
      }),
    )
    const results = await Promise.all(clients.map((c) => c.signIn(victim.email, 'not-the-password')))
    const statuses = results.map((r) => r.status).sort()
    expect(statuses.filter((s) => s === 401)).toHaveLength(t.config.login.maxFailuresPerAccount)
    expect(statuses.filter((s) => s === 429)).toHaveLength(20 - t.config.login.maxFailuresPerAccount)
    // And the right password is refused too, until the window passes.
    expect((await new Client(t.app).signIn(victim.email, victim.password)).status).toBe(429)
  })

  it('when the body is not JSON at all, then the answer is a 400 invalid_json', async () => {
    const res = await asNurse.agent
      .post('/api/patients')
      .set('X-CSRF-Token', asNurse.csrf)
      .set('Content-Type', 'application/json')
      .send('{"mrn": ')
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('invalid_json')
  })

  it('when the JSON is nested absurdly deep, then the answer is a 400', async () => {
    const body = '{"a":'.repeat(5000) + '1' + '}'.repeat(5000)
    const res = await asNurse.agent
      .post('/api/patients')
      .set('X-CSRF-Token', asNurse.csrf)
      .set('Content-Type', 'application/json')
      .send(body)
    expect(res.status).toBe(400)
  })

  it('when the body is in a character set the server does not read, then the answer is a 4xx, not a 500', async () => {
    const res = await request(t.app).post('/api/patients').set('Content-Type', 'application/json; charset=klingon').send('{}')
    expect(res.status).toBe(415)
  })
})

describe('the audit of reads while a screen polls', () => {
  const views = (entity: string, userId: number) => AuditEntry.count({ where: { action: 'view', entity, userId } })

  it('when a part of an episode is polled, then it is audited once per user and window', async () => {
    const before = await views('results', nurse.id)
    for (let i = 0; i < 4; i += 1)
      expect((await asNurse.get(`/api/referrals/${ids.referralId}/results`).set('X-Ferrolane-Refetch', '1')).status).toBe(200)
    expect((await asNurse.get(`/api/referrals/${ids.referralId}/results`)).status).toBe(200)
    expect(await views('results', nurse.id)).toBe(before + 1)
  })

  it('when a person opens the episode, then every open is audited; its background refetches are not', async () => {
    const before = await views('referral', nurse.id)
    await asNurse.get(`/api/referrals/${ids.referralId}`).expect(200)
    await asNurse.get(`/api/referrals/${ids.referralId}`).expect(200)
    await asNurse.get(`/api/referrals/${ids.referralId}`).set('X-Ferrolane-Refetch', '1').expect(200)
    expect(await views('referral', nurse.id)).toBe(before + 2)
  })

  it('when another user reads the same part, then their read is audited too', async () => {
    const asDoctor = await new Client(t.app).mustSignIn(doctor.email, doctor.password)
    const before = await views('results', doctor.id)
    await asDoctor.get(`/api/referrals/${ids.referralId}/results`).set('X-Ferrolane-Refetch', '1').expect(200)
    expect(await views('results', doctor.id)).toBe(before + 1)
  })
})
