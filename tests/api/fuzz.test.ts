import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { ROLE_MATRIX, type MatrixEntry } from './roleMatrix.data'
import type { Role } from '../../shared/roles'
import { PERMISSIONS, type Access } from '../../shared/permissions'

// Issue #12, point 8: every route of the role matrix, called by a role that may call it, gets
// hostile bodies and query strings. None may answer 5xx, and none may change stored data.
let t: TestApp
const staff = {} as Record<Role, StaffFixture>
const clients = {} as Record<Role | 'anonymous', Client>
let params: Record<string, string>

// Tables whose rows a refused request legitimately touches: sessions (every request), the
// sign-in and reply-link throttles, the audit of reads.
const VOLATILE = new Set(['sessions', 'login_failures', 'reply_failures', 'audit_entries', 'schema_migrations'])

// Routes that take no input but their path: any request that reaches them is a valid one (write
// the letter, reset the password, sign out), so they are fuzzed after the data check.
const PATH_ONLY = new Set([
  'POST /api/referrals/:id/letters',
  'POST /api/appointments/:id/letter',
  'POST /api/users/:id/reset-password',
  'POST /api/tasks/:id/done',
  'POST /api/replies/:token/confirm',
  'POST /api/auth/logout',
])

async function fingerprint(): Promise<Record<string, string>> {
  const tables = await t.sequelize.query<{ name: string }>(
    `SELECT table_name AS name FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE'`,
    { type: QueryTypes.SELECT },
  )
  const names = tables.map((r) => r.name).filter((n) => !VOLATILE.has(n))
  const rows = await t.sequelize.query<{ Table: string; Checksum: string | number | null }>(
    `CHECKSUM TABLE ${names.map((n) => `\`${n}\``).join(', ')}`,
    { type: QueryTypes.SELECT },
  )
  const out: Record<string, string> = Object.fromEntries(rows.map((r) => [r.Table.split('.').pop()!, String(r.Checksum)]))
  // Writes leave an audit row that is not a read; reads and sign-ins do not count.
  const [written] = await t.sequelize.query<{ n: number }>(
    `SELECT COUNT(*) AS n FROM audit_entries WHERE action NOT IN ('view', 'export', 'sign-in', 'sign-out')`,
    { type: QueryTypes.SELECT },
  )
  out['audit_entries (writes)'] = String(written!.n)
  return out
}

const long = 'x'.repeat(200_000)
let deep: unknown = 1
for (let i = 0; i < 40; i += 1) deep = { a: [deep] }
const FIELDS = [
  'mrn',
  'givenName',
  'familyName',
  'dateOfBirth',
  'sex',
  'email',
  'password',
  'currentPassword',
  'newPassword',
  'name',
  'role',
  'title',
  'kind',
  'reason',
  'to',
  'analyte',
  'unit',
  'value',
  'takenAt',
  'startsAt',
  'durationMin',
  'location',
  'version',
  'action',
  'diagnosis',
  'productCode',
  'doseMg',
  'code',
  'surgeryDate',
  'plannedSurgeryDate',
  'procedureCode',
  'surgeonId',
  'patientId',
  'chairs',
  'active',
  'mapping',
  'columns',
  'complications',
  'settings',
]
const withAll = (v: unknown) => JSON.stringify(Object.fromEntries(FIELDS.map((f) => [f, v])))

interface Variant {
  label: string
  type: string
  body: string
}
const BODIES: Variant[] = [
  ...[
    '{"toString":"x"}',
    '{"valueOf":1}',
    '{"hasOwnProperty":1}',
    '{"constructor":{"prototype":{"polluted":1}}}',
    '{"__proto__":{"polluted":1}}',
    '{"email":"a@b.test","nested":{"toString":{}}}',
  ].map((body) => ({ label: `prototype key ${body}`, type: 'application/json', body })),
  { label: 'malformed JSON', type: 'application/json', body: '{"mrn": "A1", ' },
  { label: 'a JSON string, not an object', type: 'application/json', body: '"hello"' },
  { label: 'a JSON array', type: 'application/json', body: '[1, {"a": 2}, null]' },
  { label: 'text/plain', type: 'text/plain', body: 'mrn=ABC123' },
  { label: 'a form body', type: 'application/x-www-form-urlencoded', body: 'toString=1&mrn=ABC&__proto__[x]=1' },
  { label: 'an unknown content type', type: 'application/x-ferrolane', body: '\u0000\u0001binary' },
  { label: 'every field an object', type: 'application/json', body: withAll({ $gt: '' }) },
  { label: 'every field an array', type: 'application/json', body: withAll([1, 'two', null]) },
  { label: 'every field a huge number', type: 'application/json', body: withAll(1e308) },
  { label: 'every field a negative number', type: 'application/json', body: withAll(-1) },
  { label: 'every field null', type: 'application/json', body: withAll(null) },
  { label: 'every field an over-long string', type: 'application/json', body: withAll(long.slice(0, 5_000)) },
  { label: 'one 200 kB string', type: 'application/json', body: JSON.stringify({ title: long, reason: long }) },
  { label: 'deeply nested values', type: 'application/json', body: JSON.stringify({ mapping: deep, columns: deep, settings: deep }) },
  {
    label: 'a wide array',
    type: 'application/json',
    body: JSON.stringify({ complications: Array.from({ length: 20_000 }, (_, i) => `c${i}`) }),
  },
  { label: 'a body over the size limit', type: 'application/json', body: JSON.stringify({ notes: 'y'.repeat(1_200_000) }) },
]
const QUERIES = [
  'toString=1&valueOf=2',
  '__proto__=x&constructor=y',
  'format=csv&table=__proto__&sort=constructor&analyte=toString&role=__proto__',
  `from=${long.slice(0, 3000)}&to=-1&page=-5&pageSize=99999999999&q=${long.slice(0, 3000)}`,
  'stage=a&stage=b&flag[]=1&priority=&commit=maybe&includeInactive=__proto__&cardiacOutputLMin=NaN',
  'from=2026-02-31&to=1900-01-01&surgeonId=1e400&procedureCode=%00',
]

/** The caller: the episode's surgeon where only surgeons may call, else the first allowed role. */
function callerFor(entry: MatrixEntry): Role | 'anonymous' {
  const allow: Access = PERMISSIONS[entry.action]
  if (allow === 'public') return 'anonymous'
  if (allow === 'signed-in') return 'nurse'
  return allow[0]!
}

function pathOf(entry: MatrixEntry): string {
  return entry.path.replace(/:(\w+)/g, (_m, name: string) => params[name] ?? '1')
}

function send(c: Client, method: MatrixEntry['method'], path: string) {
  const m = method.toLowerCase() as 'get' | 'post' | 'patch' | 'put' | 'delete'
  return c.agent[m](path).set('X-CSRF-Token', c.csrf)
}

beforeAll(async () => {
  // Hostile sign-ins are part of the run; the throttle must not stop the staff signing in.
  t = makeTestApp({ LOGIN_MAX_FAILURES_ADDRESS: '10000', LOGIN_MAX_FAILURES_ACCOUNT: '1000', REPLY_MAX_BAD_TOKENS: '10000' })
  await cleanDatabase(t.sequelize)
  for (const role of ['admin', 'nurse', 'doctor', 'surgeon'] as const) staff[role] = await makeStaff(role)
  const { referral } = await makeEpisode({ surgeonId: staff.surgeon.id })
  const procedure = await t.sequelize.query<{ code: string }>('SELECT code FROM procedures LIMIT 1', { type: QueryTypes.SELECT })
  params = { id: String(referral.id), code: procedure[0]!.code, token: 'A'.repeat(43), source: 'Kestrel Vale Laboratory', name: 'funnel' }
  clients.anonymous = new Client(t.app)
  await clients.anonymous.fetchCsrf()
  for (const role of ['admin', 'nurse', 'doctor', 'surgeon'] as const)
    clients[role] = await new Client(t.app).mustSignIn(staff[role].email, staff[role].password)
})
afterAll(async () => {
  await t.close()
})

const key = (e: MatrixEntry) => `${e.method} ${e.path}`

/** Every hostile variant for one route, sent side by side; returns the 5xx answers. */
async function fuzzRoute(entry: MatrixEntry, bodies = BODIES): Promise<{ calls: number; failures: string[] }> {
  const c = clients[callerFor(entry)]
  const path = pathOf(entry)
  const calls: Promise<{ label: string; res: { status: number; body: unknown } }>[] = QUERIES.map(async (q) => ({
    label: `query ${q.slice(0, 60)}`,
    res: await send(c, entry.method, `${path}?${q}`),
  }))
  if (entry.method !== 'GET') {
    for (const v of bodies)
      calls.push((async () => ({ label: v.label, res: await send(c, entry.method, path).set('Content-Type', v.type).send(v.body) }))())
    calls.push(
      (async () => ({
        label: 'multipart with hostile fields',
        res: await send(c, entry.method, path)
          .field('toString', 'x')
          .field('title', long.slice(0, 5000))
          .field('kind', '__proto__')
          .attach('file', Buffer.from('not a file'), 'x.csv'),
      }))(),
    )
  }
  const answers = await Promise.all(calls)
  const failures = answers
    .filter((a) => a.res.status >= 500)
    .map((a) => `${entry.method} ${path} (${a.label}) → ${a.res.status} ${JSON.stringify(a.res.body).slice(0, 200)}`)
  return { calls: answers.length, failures }
}

describe('hostile input on every route', () => {
  it('then no route answers 5xx, and no stored data changes', async () => {
    const before = await fingerprint()
    const failures: string[] = []
    let calls = 0
    for (const entry of ROLE_MATRIX.filter((e) => !PATH_ONLY.has(key(e)))) {
      const r = await fuzzRoute(entry)
      calls += r.calls
      failures.push(...r.failures)
    }
    expect(failures, failures.join('\n')).toEqual([])
    expect(calls).toBeGreaterThan(ROLE_MATRIX.length * QUERIES.length)
    expect(await fingerprint()).toEqual(before)
    // Nothing reached Object.prototype.
    expect(({} as Record<string, unknown>).polluted).toBeUndefined()
  }, 120_000)

  it('then the routes that act on their path alone answer no 5xx either', async () => {
    const failures: string[] = []
    // Signing out ends the session the other calls use: it goes last.
    const entries = ROLE_MATRIX.filter((e) => PATH_ONLY.has(key(e))).sort(
      (a, b) => Number(a.path === '/api/auth/logout') - Number(b.path === '/api/auth/logout'),
    )
    expect(entries).toHaveLength(PATH_ONLY.size)
    // They read no body: a few kinds are enough (each accepted call writes a letter, a PDF).
    const kinds = BODIES.filter((v) => /prototype|malformed|form body|unknown content|over-long|nested/.test(v.label))
    for (const entry of entries) failures.push(...(await fuzzRoute(entry, kinds)).failures)
    expect(failures, failures.join('\n')).toEqual([])
  }, 120_000)
})
