import { mkdirSync, openSync, writeSync, closeSync } from 'node:fs'
import path from 'node:path'
import { Client } from './agent'
import { cleanDatabase, type TestApp } from './app'
import { makeStaff } from './factories'
import { makePatient, makeProcedure, makeReferral } from './pathwayFactories'

/** One CSV line per row, quoted where RFC 4180 requires it (a comma, a quote or a line break). */
export function csv(rows: (string | number)[][]): string {
  const cell = (v: string | number) => {
    const s = String(v)
    return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
  }
  return rows.map((r) => r.map(cell).join(',')).join('\r\n') + '\r\n'
}

export const HEADER = ['mrn', 'test_code', 'value', 'unit', 'taken_at']

/** Whole seconds, ISO 8601 with Z: the draw time `hours` ago. */
export function takenHoursAgo(hours: number): string {
  const t = new Date(Date.now() - hours * 3_600_000)
  t.setUTCMilliseconds(0)
  return t.toISOString().replace('.000Z', 'Z')
}

export interface UploadOptions {
  commit?: boolean
  source?: string
  mapping?: object
  fileName?: string
  contentType?: string
}

/** POST /api/imports/lab-results as the browser's form sends it (multipart). */
export function uploadCsv(c: Client, content: string | Buffer, o: UploadOptions = {}) {
  let req = c.agent
    .post('/api/imports/lab-results')
    .set('X-CSRF-Token', c.csrf)
    .field('commit', o.commit ? 'true' : 'false')
    .field('source', o.source ?? 'Test laboratory')
  if (o.mapping) req = req.field('mapping', JSON.stringify(o.mapping))
  return req.attach('file', Buffer.isBuffer(content) ? content : Buffer.from(content, 'utf8'), {
    filename: o.fileName ?? 'results.csv',
    contentType: o.contentType ?? 'text/csv',
  })
}

/**
 * The start of an import test: a clean database, a woman with the MRN given on an open referral
 * (`referral` sets its fields), and a nurse signed in to upload. The surgeon and operation are for
 * a test's further referrals.
 */
export async function importSetUp(t: TestApp, mrn: string, referral: Parameters<typeof makeReferral>[1] = {}) {
  await cleanDatabase(t.sequelize)
  const nurse = await makeStaff('nurse')
  const surgeon = await makeStaff('surgeon')
  const procedureId = (await makeProcedure()).id
  const patient = await makePatient({ mrn, sex: 'female' })
  const referralId = (await makeReferral({ patientId: patient.id, procedureId, surgeonId: surgeon.id }, referral)).id
  const c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
  return { c, nurse, surgeonId: surgeon.id, procedureId, patientId: patient.id, referralId }
}

/**
 * A large CSV written to disk line by line (never held whole in memory), for the memory-bound
 * test and the bench: `rows` rows cycling over the MRNs given.
 */
export function writeLargeCsv(file: string, mrns: string[], rows: number): number {
  mkdirSync(path.dirname(file), { recursive: true })
  const fd = openSync(file, 'w')
  let bytes = 0
  const put = (s: string) => {
    bytes += writeSync(fd, s)
  }
  put(HEADER.join(',') + '\n')
  const codes: [string, string, (i: number) => string][] = [
    ['HB', 'g/L', (i) => String(90 + (i % 70))],
    ['FERR', 'ug/L', (i) => String(10 + (i % 300))],
    ['CRP', 'mg/L', (i) => String(i % 40)],
    ['MCV', 'fL', (i) => String(70 + (i % 30))],
  ]
  const base = Date.now() - 400 * 86_400_000
  let buf = ''
  for (let i = 0; i < rows; i++) {
    const [code, unit, value] = codes[i % codes.length]!
    // Each row its own draw minute, so no two rows share a natural key.
    const at = new Date(base + i * 60_000).toISOString().replace('.000Z', 'Z')
    buf += `${mrns[i % mrns.length]},${code},${value(i)},${unit},${at}\n`
    if (buf.length > 64 * 1024) {
      put(buf)
      buf = ''
    }
  }
  put(buf)
  closeSync(fd)
  return bytes
}

type Json = Record<string, unknown>

/** A FHIR R4 Observation as a laboratory would send it (LOINC code, UCUM unit). */
export function observation(o: {
  mrn?: string
  loinc?: string
  value?: number
  ucum?: string
  at?: string
  status?: string
  subject?: Json
}): Json {
  return {
    resourceType: 'Observation',
    status: o.status ?? 'final',
    code: { coding: [{ system: 'http://loinc.org', code: o.loinc ?? '718-7' }] },
    subject: o.subject ?? { identifier: { system: 'urn:ferrolane:test:mrn', value: o.mrn ?? 'NOBODY' } },
    effectiveDateTime: o.at ?? takenHoursAgo(2),
    valueQuantity: { value: o.value ?? 120, unit: o.ucum ?? 'g/L', system: 'http://unitsofmeasure.org', code: o.ucum ?? 'g/L' },
  }
}

export function bundle(resources: Json[]): Json {
  return {
    resourceType: 'Bundle',
    type: 'collection',
    entry: resources.map((resource, i) => ({ fullUrl: `urn:uuid:00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, resource })),
  }
}
