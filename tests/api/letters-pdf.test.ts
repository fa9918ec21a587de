import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { loadStarterFormulary } from '../helpers/clinicFactories'
import { binary, fullEpisode, pdfText, privateUploadDir, storedFiles } from '../helpers/documentFixtures'
import { EpisodeDocument, Letter, Referral, Result } from '../../server/models/index'
import { KIND_INFO } from '../../shared/appointments'

const uploadDir = privateUploadDir()
let t: TestApp
let doctor: Client
let surgeon: Client
let ep: Awaited<ReturnType<typeof fullEpisode>>
let letterText = ''
let letter: { id: number; documentId: number }

beforeAll(async () => {
  t = makeTestApp({ UPLOAD_DIR: uploadDir })
  await cleanDatabase(t.sequelize)
  await loadStarterFormulary()
  const s = await makeStaff('surgeon', { name: 'Ms Perpetua Arkwright' })
  const d = await makeStaff('doctor', { name: 'Dr Linnea Quarrie' })
  ep = await fullEpisode(s.id)
  doctor = await new Client(t.app).mustSignIn(d.email, d.password)
  surgeon = await new Client(t.app).mustSignIn(s.email, s.password)
})
afterAll(async () => {
  await t.close()
})

describe('the letter to the family doctor', () => {
  it('when a doctor writes it, then 201 returns the letter and its stored document, a PDF kept on the episode', async () => {
    const res = await doctor.post(`/api/referrals/${ep.referral.id}/letters`)
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    letter = res.body
    expect(letter).toEqual({ id: expect.any(Number), documentId: expect.any(Number) })
    const doc = (await EpisodeDocument.findByPk(letter.documentId, { raw: true }))!
    expect(doc).toMatchObject({ referralId: ep.referral.id, kind: 'letter', mediaType: 'application/pdf' })
    expect(storedFiles(uploadDir)).toEqual([doc.storedName])
    const list = await doctor.get(`/api/referrals/${ep.referral.id}/documents`).expect(200)
    expect(list.body.rows[0]).toMatchObject({ id: letter.documentId, kind: 'letter', letterId: letter.id })
  })

  it('when it is downloaded, then it is a PDF attachment', async () => {
    const res = await surgeon.get(`/api/letters/${letter.id}`).buffer(true).parse(binary).expect(200)
    expect(res.headers['content-type']).toBe('application/pdf')
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?family-doctor-letter-[A-Z0-9]+-\d{4}-\d{2}-\d{2}\.pdf"?$/)
    const bytes = res.body as Buffer
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-')
    letterText = await pdfText(bytes)
  })

  it(
    'then its text names the patient, the hospital number, the latest Hb in g/L, ferritin and TSAT with units, the diagnosis, ' +
      'product and doses',
    () => {
      expect(letterText).toContain(`Isolde ${ep.patient.familyName}`)
      expect(letterText).toContain(ep.patient.mrn)
      expect(letterText).toContain('Hollin Lane Surgery (invented)')
      expect(letterText).toContain('Date of birth: 15 May 1960')
      // Latest Hb is the second sample, 121 g/L = 12.1 g/dL (÷10, clinical reference units).
      expect(letterText).toMatch(/121 g\/L \(12\.1 g\/dL\)/)
      expect(letterText).toMatch(/12 µg\/L/)
      expect(letterText).toMatch(/10\.6 %/)
      expect(letterText).toContain('Absolute iron deficiency')
      expect(letterText).toMatch(/Ferric carboxymaltose \(IV\), 1000 mg intravenously/)
      expect(letterText).toMatch(/Ferric carboxymaltose \(IV\), 500 mg intravenously/)
      expect(letterText).toMatch(/1500 mg of iron/)
      expect(letterText).toContain('Ms Perpetua Arkwright')
      expect(letterText).toContain('Dr Linnea Quarrie')
      expect(letterText).toMatch(/Decision support only/)
      expect(letterText).toMatch(/01632 960 418/)
    },
  )

  it('when a surgeon tries to write one, then 403 and nothing is stored', async () => {
    const files = storedFiles(uploadDir)
    expect((await surgeon.post(`/api/referrals/${ep.referral.id}/letters`)).status).toBe(403)
    expect(storedFiles(uploadDir)).toEqual(files)
    expect(await Letter.count()).toBe(1)
  })

  it(
    'when a newer Hb was voided by the laboratory and a newer one is only preliminary, then the letter still states the final 121 ' + 'g/L',
    async () => {
      const base = {
        referralId: ep.referral.id,
        patientId: ep.referral.patientId,
        analyte: 'hb' as const,
        unitCanonical: 'g/L',
        valueReported: null,
        unitReported: null,
        enteredBy: null,
        derivedFrom: null,
        source: 'hl7',
      }
      const added = [
        await Result.create({
          ...base,
          valueCanonical: 66,
          takenAt: new Date(Date.now() - 2 * 3600_000),
          voidedAt: new Date(),
          voidReason: 'deleted by the laboratory',
        }),
        await Result.create({ ...base, valueCanonical: 67, takenAt: new Date(Date.now() - 3600_000), status: 'preliminary' }),
      ]
      try {
        const res = await doctor.post(`/api/referrals/${ep.referral.id}/letters`).expect(201)
        const pdf = await doctor.get(`/api/letters/${res.body.id}`).buffer(true).parse(binary).expect(200)
        const text = await pdfText(pdf.body as Buffer)
        expect(text).toMatch(/121 g\/L \(12\.1 g\/dL\)/)
        expect(text).not.toMatch(/\b6[67] g\/L/)
      } finally {
        await Result.destroy({ where: { id: added.map((r) => r.id) } })
      }
    },
  )
})

describe('a letter to the patient about an appointment', () => {
  it(
    'when a doctor writes one, then its text is the appointment e-mail ' + 'wording: the visit, the preparation steps and the place',
    async () => {
      const a = ep.appointments[0]!
      const res = await doctor.post(`/api/appointments/${a.id}/letter`)
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      const pdf = await doctor.get(`/api/letters/${res.body.id}`).buffer(true).parse(binary).expect(200)
      const text = await pdfText(pdf.body as Buffer)
      expect(text).toContain('Your appointment is booked')
      expect(text).toContain(`Dear Isolde,`)
      expect(text).toContain(KIND_INFO['recheck-bloods'].label)
      for (const step of KIND_INFO['recheck-bloods'].preparation) expect(text).toContain(step)
      expect(text).toContain('Day Treatment Unit, Level 2')
      expect(text).not.toMatch(/calendar file|e-mail/)
      expect((await Letter.findByPk(res.body.id, { raw: true }))!).toMatchObject({ recipient: 'patient', appointmentId: a.id })
    },
  )
})

describe('a closed episode', () => {
  it('when it is closed, then no letter can be written (422) and nothing is stored', async () => {
    await Referral.update({ stage: 'closed' }, { where: { id: ep.referral.id } })
    const files = storedFiles(uploadDir)
    const res = await doctor.post(`/api/referrals/${ep.referral.id}/letters`)
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('closed_read_only')
    expect(storedFiles(uploadDir)).toEqual(files)
    expect(await EpisodeDocument.count()).toBe(files.length)
  })
})
