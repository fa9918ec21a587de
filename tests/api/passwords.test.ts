import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { User } from '../../server/models/index'

let t: TestApp
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
})

describe("changing one's own password", () => {
  it('when the new password is shorter than 12 characters, then the 400 names newPassword', async () => {
    const s = await makeStaff('doctor')
    const c = await new Client(t.app).mustSignIn(s.email, s.password)
    const res = await c.post('/api/auth/password', { currentPassword: s.password, newPassword: 'short-1' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.newPassword).toMatch(/at least 12 characters/)
  })

  it('when the new password contains the e-mail name, then it is refused', async () => {
    const s = await makeStaff('doctor', { email: 'h.marsh@hospital.test' })
    const c = await new Client(t.app).mustSignIn(s.email, s.password)
    const res = await c.post('/api/auth/password', { currentPassword: s.password, newPassword: 'my-h.marsh-password-2026' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.newPassword).toMatch(/e-mail name/)
  })

  it('when the current password is wrong, then nothing changes', async () => {
    const s = await makeStaff('doctor')
    const c = await new Client(t.app).mustSignIn(s.email, s.password)
    const before = (await User.findByPk(s.id))!.passwordHash
    const res = await c.post('/api/auth/password', { currentPassword: 'wrong-current-pass', newPassword: 'a-brand-new-secret-77' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.currentPassword).toBeDefined()
    expect((await User.findByPk(s.id))!.passwordHash).toBe(before)
  })

  it('when the change is valid, then the new password signs in and the old does not', async () => {
    const s = await makeStaff('doctor')
    const c = await new Client(t.app).mustSignIn(s.email, s.password)
    await c.post('/api/auth/password', { currentPassword: s.password, newPassword: 'a-brand-new-secret-77' }).expect(200)
    expect((await new Client(t.app).signIn(s.email, s.password)).status).toBe(401)
    expect((await new Client(t.app).signIn(s.email, 'a-brand-new-secret-77')).status).toBe(200)
  })

  it('when an account has a temporary password, then other routes answer 403 until it is changed', async () => {
    const s = await makeStaff('admin', { mustChangePassword: true })
    const c = await new Client(t.app).mustSignIn(s.email, s.password)
    const blocked = await c.get('/api/users')
    expect(blocked.status).toBe(403)
    expect(blocked.body.error.code).toBe('password_change_required')
    expect((await c.get('/api/auth/me')).body.mustChangePassword).toBe(true)
    await c.post('/api/auth/password', { currentPassword: s.password, newPassword: 'fresh-admin-secret-42' }).expect(200)
    await c.get('/api/users').expect(200)
  })
})
