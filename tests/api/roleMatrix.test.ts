import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { ROLES, type Role } from '../../shared/roles'
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
afterAll(async () => { await t.close() })

const key = (e: { method: string; path: string }) => `${e.method} ${e.path}`

function expected(entry: MatrixEntry, caller: Role | 'anonymous'): 'allowed' | 401 | 403 {
  if (entry.allow === 'public') return 'allowed'
  if (caller === 'anonymous') return 401
  if (entry.allow === 'signed-in') return 'allowed'
  return entry.allow.includes(caller) ? 'allowed' : 403
}

async function call(entry: MatrixEntry, caller: Role | 'anonymous') {
  const c = new Client(t.app)
  if (caller === 'anonymous') await c.fetchCsrf()
  else await c.mustSignIn(staff[caller].email, staff[caller].password)
  const path = entry.path.replace(':id', String(target.id))
  switch (entry.method) {
    case 'GET': return c.get(path)
    case 'POST': return c.post(path, {})
    case 'PATCH': return c.patch(path, {})
    case 'PUT': return c.put(path, {})
    case 'DELETE': return c.delete(path)
  }
}

describe('role matrix', () => {
  it('then every mounted API route is in the matrix, and every matrix row is mounted', () => {
    const mounted = new Set(t.routes.map(key))
    const table = new Set(ROLE_MATRIX.map(key))
    expect([...mounted].filter((k) => !table.has(k)), 'mounted but missing from the matrix').toEqual([])
    expect([...table].filter((k) => !mounted.has(k)), 'in the matrix but not mounted').toEqual([])
  })

  it('then each route declares the same access as the matrix', () => {
    for (const spec of t.routes) {
      const row = ROLE_MATRIX.find((e) => key(e) === key(spec))!
      const declared = typeof spec.access === 'string' ? spec.access : [...spec.access].sort()
      const wanted = typeof row.allow === 'string' ? row.allow : [...row.allow].sort()
      expect(declared, key(spec)).toEqual(wanted)
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
