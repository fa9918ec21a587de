import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { ROLES, type Role } from '../../shared/roles'
import { PERMISSIONS, isAction, type Access } from '../../shared/permissions'
import { ROLE_MATRIX, type MatrixEntry } from './roleMatrix.data'

let t: TestApp
const staff = {} as Record<Role, StaffFixture>
let target: StaffFixture

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  for (const role of ROLES) staff[role] = await makeStaff(role)
  target = await makeStaff('nurse')
})
afterAll(async () => {
  await t.close()
})

const key = (e: { method: string; path: string }) => `${e.method} ${e.path}`

/** What the permission table says this caller gets on this route. */
function expected(entry: MatrixEntry, caller: Role | 'anonymous'): 'allowed' | 401 | 403 {
  const allow: Access = PERMISSIONS[entry.action]
  if (allow === 'public') return 'allowed'
  if (caller === 'anonymous') return 401
  if (allow === 'signed-in') return 'allowed'
  return allow.includes(caller) ? 'allowed' : 403
}

async function call(entry: MatrixEntry, caller: Role | 'anonymous') {
  const c = new Client(t.app)
  if (caller === 'anonymous') await c.fetchCsrf()
  else await c.mustSignIn(staff[caller].email, staff[caller].password)
  const path = entry.path.replace(':id', String(target.id))
  switch (entry.method) {
    case 'GET':
      return c.get(path)
    case 'POST':
      return c.post(path, {})
    case 'PATCH':
      return c.patch(path, {})
    case 'PUT':
      return c.put(path, {})
    case 'DELETE':
      return c.delete(path)
  }
}

describe('role matrix', () => {
  it('then every mounted API route is in the matrix, and every matrix row is mounted', () => {
    const mounted = new Set(t.routes.map(key))
    const table = new Set(ROLE_MATRIX.map(key))
    expect(
      [...mounted].filter((k) => !table.has(k)),
      'mounted but missing from the matrix',
    ).toEqual([])
    expect(
      [...table].filter((k) => !mounted.has(k)),
      'in the matrix but not mounted',
    ).toEqual([])
  })

  it('then every mounted route names an action that is in the permission table', () => {
    const unknown = t.routes.filter((spec) => !isAction(spec.action)).map((spec) => `${key(spec)} → ${String(spec.action)}`)
    expect(unknown).toEqual([])
  })

  it('then each route declares the same action as the matrix', () => {
    for (const spec of t.routes) {
      const row = ROLE_MATRIX.find((e) => key(e) === key(spec))!
      expect(spec.action, key(spec)).toBe(row.action)
    }
  })

  for (const entry of ROLE_MATRIX) {
    for (const caller of ['anonymous', ...ROLES] as const) {
      const want = expected(entry, caller)
      it(`${key(entry)} as ${caller} → ${want === 'allowed' ? 'not 401/403' : want}`, async () => {
        const res = await call(entry, caller)
        if (want === 'allowed') expect([401, 403], JSON.stringify(res.body)).not.toContain(res.status)
        else expect(res.status, JSON.stringify(res.body)).toBe(want)
      })
    }
  }
})
