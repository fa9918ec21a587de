import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import path from 'node:path'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import {
  binary,
  elfBytes,
  gifBytes,
  jpegBytes,
  mzBytes,
  pdfBytes,
  pngBytes,
  privateUploadDir,
  storedFiles,
  textBytes,
  upload,
} from '../helpers/documentFixtures'
import { AuditEntry, EpisodeDocument, Referral } from '../../server/models/index'
import { UPLOAD_MAX_BYTES } from '../../shared/schemas/documents'

const uploadDir = privateUploadDir()
let t: TestApp
let nurse: Client
let surgeonClient: Client
let otherSurgeonClient: Client
let surgeon: StaffFixture
let referralId = 0

beforeAll(async () => {
  t = makeTestApp({ UPLOAD_DIR: uploadDir })
  await cleanDatabase(t.sequelize)
  surgeon = await makeStaff('surgeon')
  const other = await makeStaff('surgeon')
  const n = await makeStaff('nurse')
  referralId = (await makeEpisode({ surgeonId: surgeon.id })).referral.id
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
  surgeonClient = await new Client(t.app).mustSignIn(surgeon.email, surgeon.password)
  otherSurgeonClient = await new Client(t.app).mustSignIn(other.email, other.password)
})
afterAll(async () => {
  await t.close()
})

/** Nothing was stored: no row and no file beyond those already there. */
async function expectNothingStored(rowsBefore: number, filesBefore: string[]) {
  expect(await EpisodeDocument.count()).toBe(rowsBefore)
  expect(storedFiles(uploadDir)).toEqual(filesBefore)
}

describe('uploading a document to an episode', () => {
  it('when a nurse uploads a PDF, then it is stored under a random name with its content type, size and SHA-256, and listed', async () => {
    const bytes = await pdfBytes()
    const res = await upload(nurse, referralId, { bytes, name: 'gp-bloods.pdf' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({
      kind: 'outside-results',
      kindLabel: 'Results from elsewhere',
      originalName: 'gp-bloods.pdf',
      mediaType: 'application/pdf',
      sizeBytes: bytes.length,
    })
    // SHA-256 (FIPS 180-4) of the bytes sent, computed here independently.
    expect(res.body.sha256).toBe(createHash('sha256').update(bytes).digest('hex'))
    const row = (await EpisodeDocument.findByPk(res.body.id, { raw: true }))!
    expect(row.storedName).toMatch(/^[0-9a-f-]{36}$/)
    expect(row.storedName).not.toContain('gp-bloods')
    expect(storedFiles(uploadDir)).toEqual([row.storedName])
    expect(readFileSync(path.join(uploadDir, row.storedName)).equals(bytes)).toBe(true)
    const list = await nurse.get(`/api/referrals/${referralId}/documents`).expect(200)
    expect(list.body.rows.map((d: { id: number }) => d.id)).toEqual([res.body.id])
    expect(await AuditEntry.count({ where: { entity: 'document', action: 'create', entityId: String(res.body.id) } })).toBe(1)
  })

  it('when PNG and JPEG images are uploaded, then each is accepted with the type read from its content, not its name', async () => {
    const png = await upload(nurse, referralId, { bytes: pngBytes(), name: 'scan.jpg' })
    expect(png.status, JSON.stringify(png.body)).toBe(201)
    expect(png.body.mediaType).toBe('image/png')
    const jpeg = await upload(
      nurse,
      referralId,
      { bytes: jpegBytes(), name: 'photo.jpeg' },
      { kind: 'referral-letter', title: 'Referral letter photo' },
    )
    expect(jpeg.status, JSON.stringify(jpeg.body)).toBe(201)
    expect(jpeg.body.mediaType).toBe('image/jpeg')
  })

  it('then every file on disk has exactly one row, and every row its file with the recorded size and hash', async () => {
    const rows = await EpisodeDocument.findAll({ raw: true })
    expect(storedFiles(uploadDir)).toEqual(rows.map((r) => r.storedName).sort())
    for (const r of rows) {
      const bytes = readFileSync(path.join(uploadDir, r.storedName))
      expect(bytes.length).toBe(r.sizeBytes)
      expect(createHash('sha256').update(bytes).digest('hex')).toBe(r.sha256)
    }
  })

  const refusals: [string, () => Buffer | Promise<Buffer>, string, RegExp][] = [
    ['a Linux executable (ELF header) named .pdf', elfBytes, 'results.pdf', /Linux program \(ELF\).*ends in \.pdf.*PDF, PNG or JPEG/],
    ['a Windows executable (MZ header) named .pdf', mzBytes, 'letter.pdf', /Windows program \(EXE\).*ends in \.pdf/],
    ['a GIF image', gifBytes, 'scan.gif', /GIF image.*only PDF, PNG or JPEG/],
    ['a text file named .pdf', textBytes, 'notes.pdf', /plain text.*ends in \.pdf/],
  ]
  for (const [what, bytes, name, reason] of refusals) {
    it(`when ${what} is uploaded, then it is refused with 415 saying what the file is, and nothing is stored`, async () => {
      const rows = await EpisodeDocument.count()
      const files = storedFiles(uploadDir)
      const res = await upload(nurse, referralId, { bytes: await bytes(), name })
      expect(res.status, JSON.stringify(res.body)).toBe(415)
      expect(res.body.error.code).toBe('unsupported_media_type')
      expect(res.body.error.message).toMatch(reason)
      expect(res.body.error.fields.file).toMatch(reason)
      await expectNothingStored(rows, files)
    })
  }

  it('when the file is over 10 MB, then it is refused with 413 naming the limit, and nothing is stored', async () => {
    const rows = await EpisodeDocument.count()
    const files = storedFiles(uploadDir)
    const big = Buffer.concat([await pdfBytes(), Buffer.alloc(UPLOAD_MAX_BYTES + 1)])
    const res = await upload(nurse, referralId, { bytes: big, name: 'huge.pdf' })
    expect(res.status, JSON.stringify(res.body)).toBe(413)
    expect(res.body.error).toMatchObject({ code: 'file_too_large', fields: { file: 'must be at most 10 MB' } })
    expect(res.body.error.message).toMatch(/larger than 10 MB/)
    await expectNothingStored(rows, files)
  })

  it('when the file is exactly 10 MB, then it is accepted (the limit is inclusive)', async () => {
    const pdf = await pdfBytes()
    const res = await upload(nurse, referralId, {
      bytes: Buffer.concat([pdf, Buffer.alloc(UPLOAD_MAX_BYTES - pdf.length)]),
      name: 'exactly-10mb.pdf',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.sizeBytes).toBe(UPLOAD_MAX_BYTES)
  })

  it('when the kind or title is missing or wrong, then 400 names the field, and nothing is stored', async () => {
    const rows = await EpisodeDocument.count()
    const files = storedFiles(uploadDir)
    const noTitle = await upload(nurse, referralId, { bytes: await pdfBytes(), name: 'a.pdf' }, { kind: 'outside-results' })
    expect(noTitle.status).toBe(400)
    expect(noTitle.body.error.fields.title).toMatch(/Title is required/)
    const badKind = await upload(nurse, referralId, { bytes: await pdfBytes(), name: 'a.pdf' }, { kind: 'letter', title: 'Pretend letter' })
    expect(badKind.status).toBe(400)
    expect(badKind.body.error.fields.kind).toMatch(/Kind must be one of: Referral letter, Results from elsewhere, Other/)
    const noFile = await nurse.post(`/api/referrals/${referralId}/documents`, { kind: 'other', title: 'x' })
    expect(noFile.status).toBe(400)
    expect(noFile.body.error.fields.file).toBe('is required')
    await expectNothingStored(rows, files)
  })
})

describe('downloading and who may see documents', () => {
  it('when a document is downloaded, then it comes as an attachment with the stored type, nosniff and the same bytes', async () => {
    const bytes = await pdfBytes('Download check (invented)')
    const up = await upload(nurse, referralId, { bytes, name: 'Résumé des résultats.pdf' })
    const res = await nurse.get(`/api/documents/${up.body.id}`).buffer(true).parse(binary).expect(200)
    expect(res.headers['content-type']).toBe('application/pdf')
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    // RFC 6266: attachment, with the UTF-8 name in filename* (RFC 8187).
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="R.sum. des r.sultats\.pdf"; filename\*=UTF-8''R%C3%A9sum%C3%A9%20des%20r%C3%A9sultats\.pdf$/,
    )
    expect((res.body as Buffer).equals(bytes)).toBe(true)
    expect(await AuditEntry.count({ where: { entity: 'document', action: 'download', entityId: String(up.body.id) } })).toBe(1)
  })

  it("when a surgeon opens another surgeon's patient's documents, then 403 and nothing is listed; their own patient works", async () => {
    const doc = await EpisodeDocument.findOne({ where: { referralId }, raw: true })
    expect((await otherSurgeonClient.get(`/api/referrals/${referralId}/documents`)).status).toBe(403)
    expect((await otherSurgeonClient.get(`/api/documents/${doc!.id}`)).status).toBe(403)
    expect((await surgeonClient.get(`/api/referrals/${referralId}/documents`)).status).toBe(200)
    const files = storedFiles(uploadDir)
    const refused = await upload(otherSurgeonClient, referralId, { bytes: await pdfBytes(), name: 'x.pdf' })
    expect(refused.status).toBe(403)
    expect(storedFiles(uploadDir)).toEqual(files)
  })

  it('when the episode is closed, then an upload is refused (422, read-only) and nothing is stored; the list still opens', async () => {
    await Referral.update({ stage: 'closed' }, { where: { id: referralId } })
    const rows = await EpisodeDocument.count()
    const files = storedFiles(uploadDir)
    const res = await upload(nurse, referralId, { bytes: await pdfBytes(), name: 'late.pdf' })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('closed_read_only')
    await expectNothingStored(rows, files)
    const list = await nurse.get(`/api/referrals/${referralId}/documents`).expect(200)
    expect(list.body.readOnly).toBe(true)
  })
})
