import { readdirSync, existsSync, mkdtempSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import PDFDocument from 'pdfkit'
import { Administration, Appointment, ClinicReview, Patient, Prescription, Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'
import { makeEpisode } from './clinicFactories'
import type { Client } from './agent'

/**
 * File fixtures made by the tests. Magic numbers: PDF "%PDF-" (ISO 32000-1 §7.5.2), PNG's
 * 8-byte signature and IHDR chunk (RFC 2083 §3.1, §4.1.1), JPEG SOI FF D8 FF with a JFIF APP0,
 * GIF "GIF89a", ELF 7F 45 4C 46 and Windows "MZ" (common practice: the formats' own headers).
 */
export function pdfBytes(text = 'Outside results (invented test document)'): Promise<Buffer> {
  const doc = new PDFDocument({ size: 'A4' })
  const chunks: Buffer[] = []
  doc.on('data', (c: Buffer) => chunks.push(c))
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))))
  doc.fontSize(12).text(text)
  doc.end()
  return done
}

export function pngBytes(): Buffer {
  const ihdr = Buffer.from('0000000d49484452000000010000000108060000001f15c489', 'hex')
  const idat = Buffer.from('0000000a49444154789c63000100000500010d0a2db4', 'hex')
  const iend = Buffer.from('0000000049454e44ae426082', 'hex')
  return Buffer.concat([Buffer.from('89504e470d0a1a0a', 'hex'), ihdr, idat, iend])
}

export function jpegBytes(): Buffer {
  return Buffer.concat([Buffer.from('ffd8ffe000104a46494600010100000100010000', 'hex'), Buffer.alloc(64), Buffer.from('ffd9', 'hex')])
}

export const gifBytes = () => Buffer.concat([Buffer.from('GIF89a'), Buffer.from([1, 0, 1, 0, 0, 0, 0]), Buffer.alloc(32)])
export const elfBytes = () => Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0]), Buffer.alloc(120)])
export const mzBytes = () => Buffer.concat([Buffer.from('MZ'), Buffer.alloc(126)])
export const textBytes = () => Buffer.from('Ferritin 12 ug/L\nHb 104 g/L\nThese are notes typed into a text file.\n'.repeat(4))

/** A private upload directory per test file, so the files on disk can be counted exactly. */
export function privateUploadDir(): string {
  return mkdtempSync(path.join(os.tmpdir(), 'ferrolane-uploads-'))
}

export function storedFiles(dir: string): string[] {
  return existsSync(dir) ? readdirSync(dir).sort() : []
}

export function upload(
  c: Client,
  referralId: number,
  file: { bytes: Buffer; name: string },
  fields: Record<string, string> = { kind: 'outside-results', title: 'Blood results from the family doctor' },
) {
  let req = c.agent.post(`/api/referrals/${referralId}/documents`).set('X-CSRF-Token', c.csrf)
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v)
  return req.attach('file', file.bytes, file.name)
}

/** Supertest keeps binary bodies only when asked to: `.buffer(true).parse(binary)`. */
export function binary(res: unknown, cb: (err: Error | null, body: Buffer) => void): void {
  const stream = res as NodeJS.ReadableStream
  const chunks: Buffer[] = []
  stream.on('data', (c: Buffer) => chunks.push(c))
  stream.on('end', () => cb(null, Buffer.concat(chunks)))
}

/** The text of every page of a PDF, through pdfjs-dist's legacy (Node) build. */
export async function pdfText(bytes: Buffer): Promise<string> {
  const { getDocument } = await import('pdfjs-dist/legacy/build/pdf.mjs')
  const pdf = await getDocument({ data: new Uint8Array(bytes), disableFontFace: true, useSystemFonts: false }).promise
  const pages: string[] = []
  for (let i = 1; i <= pdf.numPages; i += 1) {
    const content = await (await pdf.getPage(i)).getTextContent()
    pages.push(content.items.map((it) => ('str' in it ? it.str : '')).join(' '))
  }
  await pdf.destroy()
  // The font maps the micro sign to the Greek mu; both read "µ" to a person.
  return pages
    .join('\n')
    .replace(/\u03bc/g, 'µ')
    .replace(/\s+/g, ' ')
}

const noon = (iso: string) => new Date(`${iso}T12:00:00Z`)

/**
 * One full episode with invented figures: Hb 104 → 121 g/L, ferritin 12 µg/L, iron 8 µmol/L,
 * transferrin 3.0 g/L, TSAT 10 %, creatinine 88.4 µmol/L; a clinic review; ferric
 * carboxymaltose 1000 mg then 500 mg; three appointments (confirmed, asked to rebook, cancelled).
 */
export async function fullEpisode(surgeonId: number) {
  const d0 = addDays(todayIso(), -30)
  const { patient, referral, procedure } = await makeEpisode({
    surgeonId,
    weightKg: 70,
    heightCm: 165,
    sex: 'female',
    hb: [
      { hbGL: 104, takenAt: noon(d0) },
      { hbGL: 121, takenAt: noon(addDays(d0, 25)) },
    ],
    referral: { stage: 'treating', plannedSurgeryDate: addDays(todayIso(), 21), recheckDueDate: addDays(todayIso(), 7) },
    iron: null, // this fixture stores its own iron studies below, with the sample's time
  })
  await Patient.update(
    { givenName: 'Isolde', familyName: `Fernsby${patient.id}`, gpPractice: 'Hollin Lane Surgery (invented)' },
    { where: { id: patient.id } },
  )
  const base = { referralId: referral.id, patientId: patient.id, takenAt: noon(d0), enteredBy: null }
  const ferritin = await Result.create({
    ...base,
    analyte: 'ferritin',
    valueCanonical: 12,
    unitCanonical: 'µg/L',
    valueReported: 12,
    unitReported: 'µg/L',
    derivedFrom: null,
  })
  const iron = await Result.create({
    ...base,
    analyte: 'iron',
    valueCanonical: 8,
    unitCanonical: 'µmol/L',
    valueReported: 8,
    unitReported: 'µmol/L',
    derivedFrom: null,
  })
  const transferrin = await Result.create({
    ...base,
    analyte: 'transferrin',
    valueCanonical: 3,
    unitCanonical: 'g/L',
    valueReported: 3,
    unitReported: 'g/L',
    derivedFrom: null,
  })
  // TSAT = iron / (25.1 × transferrin) = 8 / 75.3 = 10.6 % (clinical reference, TIBC factor 25.1); stored as 10.6.
  await Result.create({
    ...base,
    analyte: 'tsat',
    valueCanonical: 10.6,
    unitCanonical: '%',
    valueReported: null,
    unitReported: null,
    source: 'derived',
    derivedFrom: [iron.id, transferrin.id],
  })
  await Result.create({
    ...base,
    analyte: 'creatinine',
    valueCanonical: 88.4,
    unitCanonical: 'µmol/L',
    valueReported: 88.4,
    unitReported: 'µmol/L',
    derivedFrom: null,
  })
  await ClinicReview.create({
    referralId: referral.id,
    diagnosis: 'absolute-iron-deficiency',
    notes: null,
    plan: 'IV iron in two doses, re-check in three weeks',
    reviewedBy: null,
    reviewedAt: noon(addDays(d0, 2)),
  })
  const rx = await Prescription.create({
    referralId: referral.id,
    productCode: 'ferric-carboxymaltose',
    route: 'iv',
    weightKg: 70,
    hbGL: 104,
    targetHbGL: 150,
    deficitMg: 1273,
    totalMg: 1500,
    firstDoseDate: addDays(d0, 4),
    plan: { doses: [], warnings: [] },
    cautions: {} as never,
    overrideReason: null,
    status: 'active',
    prescribedBy: null,
    prescribedAt: noon(addDays(d0, 2)),
  })
  await Administration.create({
    prescriptionId: rx.id,
    referralId: referral.id,
    doseMg: 1000,
    givenAt: noon(addDays(d0, 4)),
    batchNumber: 'FCM-TEST-1',
    reaction: 'none',
    reactionNotes: null,
    givenBy: null,
  })
  await Administration.create({
    prescriptionId: rx.id,
    referralId: referral.id,
    doseMg: 500,
    givenAt: noon(addDays(d0, 11)),
    batchNumber: 'FCM-TEST-2',
    reaction: 'none',
    reactionNotes: null,
    givenBy: null,
  })
  const visit = (days: number, kind: 'iron-infusion' | 'recheck-bloods', status: 'confirmed' | 'rebook-requested' | 'cancelled') => {
    const startsAt = noon(addDays(todayIso(), days))
    return Appointment.create({
      referralId: referral.id,
      patientId: patient.id,
      kind,
      startsAt,
      endsAt: new Date(startsAt.getTime() + 3_600_000),
      durationMin: 60,
      location: 'Day Treatment Unit, Level 2',
      infusionSessionId: null,
      status,
      remindAt: null,
      createdBy: null,
      ...(status === 'cancelled' ? { cancelReason: 'Clinic closed for training' } : {}),
    })
  }
  const appointments = [
    await visit(3, 'recheck-bloods', 'confirmed'),
    await visit(5, 'iron-infusion', 'rebook-requested'),
    await visit(6, 'iron-infusion', 'cancelled'),
  ]
  return { patient: (await Patient.findByPk(patient.id))!, referral, procedure, ferritin, appointments }
}
