import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { AuditEntry, User } from '../../server/models/index'

let t: TestApp
let admin: StaffFixture
let c: Client
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  admin = await makeStaff('admin')
  c = await new Client(t.app).mustSignIn(admin.email, admin.password)
})

describe('staff accounts (admin)', () => {
  it('when an admin adds a user, then they get a temporary password that must be changed at first sign-in', async () => {
    const res = await c.post('/api/users', { email: 'New.Nurse@Hospital.test', name: 'New Nurse', role: 'nurse' })
    expect(res.status).toBe(201)
    expect(res.body.user).toMatchObject({ email: 'new.nurse@hospital.test', role: 'nurse', active: true, mustChangePassword: true })
    expect(res.body.temporaryPassword).toMatch(/^[a-z2-9]{4}(-[a-z2-9]{4}){3}$/)
    const first = await new Client(t.app).mustSignIn('new.nurse@hospital.test', res.body.temporaryPassword)
    expect((await first.get('/api/auth/me')).body.mustChangePassword).toBe(true)
  })

  it('when the e-mail is already used, then 409 and no second account', async () => {
    await c.post('/api/users', { email: 'dup@hospital.test', name: 'One', role: 'nurse' }).expect(201)
    const res = await c.post('/api/users', { email: 'dup@hospital.test', name: 'Two', role: 'doctor' })
    expect(res.status).toBe(409)
    expect(await User.count({ where: { email: 'dup@hospital.test' } })).toBe(1)
  })

  it('when the role is not one of the four, then 400 names role and nothing is created', async () => {
    const before = await User.count()
    const res = await c.post('/api/users', { email: 'x@hospital.test', name: 'X Person', role: 'porter' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.role).toMatch(/Role must be one of/)
    expect(await User.count()).toBe(before)
  })

  it('when an admin changes a role, then the audit row holds the before and after', async () => {
    const s = await makeStaff('nurse')
    const res = await c.patch(`/api/users/${s.id}`, { role: 'doctor' })
    expect(res.status).toBe(200)
    expect(res.body.role).toBe('doctor')
    const audit = await AuditEntry.findOne({ where: { entity: 'user', entityId: String(s.id), action: 'update' }, raw: true })
    expect(audit).toMatchObject({ userId: admin.id, before: { role: 'nurse' }, after: { role: 'doctor' } })
  })

  it('when a user is deactivated, then their open session stops working at once and they cannot sign in', async () => {
    const s = await makeStaff('surgeon')
    const theirs = await new Client(t.app).mustSignIn(s.email, s.password)
    await theirs.get('/api/auth/me').expect(200)
    await c.patch(`/api/users/${s.id}`, { active: false }).expect(200)
    await theirs.get('/api/auth/me').expect(401)
    expect((await new Client(t.app).signIn(s.email, s.password)).status).toBe(401)
  })

  it('when an admin resets a password, then the old one stops working and the new one must be changed', async () => {
    const s = await makeStaff('doctor')
    const res = await c.post(`/api/users/${s.id}/reset-password`)
    expect(res.status).toBe(200)
    expect((await new Client(t.app).signIn(s.email, s.password)).status).toBe(401)
    const fresh = await new Client(t.app).mustSignIn(s.email, res.body.temporaryPassword)
    expect((await fresh.get('/api/auth/me')).body.mustChangePassword).toBe(true)
  })

  it('when an admin tries to deactivate themself, then 422 and they stay active', async () => {
    const res = await c.patch(`/api/users/${admin.id}`, { active: false })
    expect(res.status).toBe(422)
    expect((await User.findByPk(admin.id))!.active).toBe(true)
  })

  it('when the user id is not a number or unknown, then 400 or 404', async () => {
    expect((await c.patch('/api/users/abc', { role: 'nurse' })).status).toBe(400)
    expect((await c.patch('/api/users/999999', { role: 'nurse' })).status).toBe(404)
  })

  it('then the list shows every account with its status', async () => {
    await makeStaff('nurse', { active: false, name: 'Zed Inactive' })
    const res = await c.get('/api/users').expect(200)
    expect(res.body.rows.length).toBe(2)
    expect(res.body.rows.find((r: { name: string }) => r.name === 'Zed Inactive').active).toBe(false)
    expect(res.body.rows[0]).not.toHaveProperty('passwordHash')
  })
})
