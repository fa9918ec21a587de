import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { oru, send } from '../helpers/hl7'
import { AuditEntry, Result } from '../../server/models/index'
import type { MllpListener } from '../../server/services/hl7/listener'
import { startTestListener } from '../helpers/hl7Listener'

let t: TestApp
let listener: MllpListener
let port: number
let admin: Client
let nurse: Client

beforeAll(async () => {
  t = makeTestApp()
  ;({ listener, port } = await startTestListener(t.sequelize, t.config))
})
afterAll(async () => {
  await listener.stop()
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  const a = await makeStaff('admin')
  const n = await makeStaff('nurse')
  admin = await new Client(t.app).mustSignIn(a.email, a.password)
  nurse = await new Client(t.app).mustSignIn(n.email, n.password)
})

describe('the Interfaces API', () => {
  it(
    "when messages have arrived, then the overview shows the listener, this hour's count and the queue, and a search by MRN finds " +
      'them',
    async () => {
      await send(port, oru({ mrn: 'HL73999', control: 'IF-1', obx: [{ value: '99' }] }))
      const res = await nurse.get('/api/interfaces/hl7').expect(200)
      expect(res.body.listener).toMatchObject({ listening: true, port, host: '127.0.0.1' })
      expect(res.body.attention).toBe(1)
      expect(res.body.perHour.reduce((n: number, h: { count: number }) => n + h.count, 0)).toBe(1)
      expect(res.body.outcomes).toEqual([{ outcome: 'error', count: 1 }])
      expect(res.body.errorCodes).toEqual([{ code: 'unknown-mrn', count: 1 }])
      const list = await nurse.get('/api/interfaces/hl7/messages?q=HL73999').expect(200)
      expect(list.body).toMatchObject({
        total: 1,
        patientDetail: true,
        items: [
          { controlId: 'IF-1', outcome: 'error', needsAttention: true, patientMrn: 'HL73999', errorText: 'no patient has MRN HL73999' },
        ],
      })
      expect((await nurse.get('/api/interfaces/hl7/messages?q=NOBODY').expect(200)).body.total).toBe(0)
    },
  )

  it(
    'when an admin (no clinical role) looks at the interface, then the answers carry the outcomes and error codes but no MRN, name ' +
      "or raw text, a search by MRN finds nothing, and a message's detail and process-again are refused",
    async () => {
      const p = await makePatient({ mrn: 'HL73001', givenName: 'Oriel', familyName: 'Quennick' })
      await makeReferral({ patientId: p.id, procedureId: (await makeProcedure()).id, surgeonId: (await makeStaff('surgeon')).id })
      await send(port, oru({ mrn: 'HL73001', control: 'IF-A1', obx: [{ value: '123' }] }))
      await send(port, oru({ mrn: 'HL73999', control: 'IF-A2', obx: [{ value: '99' }] }))
      const overview = await admin.get('/api/interfaces/hl7').expect(200)
      expect(overview.body).toMatchObject({
        attention: 1,
        outcomes: [
          { outcome: 'error', count: 1 },
          { outcome: 'stored', count: 1 },
        ],
        errorCodes: [{ code: 'unknown-mrn', count: 1 }],
      })
      const list = await admin.get('/api/interfaces/hl7/messages').expect(200)
      expect(list.body.patientDetail).toBe(false)
      expect(
        list.body.items.map(
          (i: { controlId: string; outcome: string; errorCode: string | null; patientMrn: string | null; errorText: string | null }) => [
            i.controlId,
            i.outcome,
            i.errorCode,
            i.patientMrn,
            i.errorText,
          ],
        ),
      ).toEqual([
        ['IF-A2', 'error', 'unknown-mrn', null, null],
        ['IF-A1', 'stored', null, null, null],
      ])
      const queue = await admin.get('/api/interfaces/hl7/messages?attention=true').expect(200)
      expect(queue.body.total).toBe(1)
      for (const answer of [overview.text, list.text, queue.text]) {
        for (const secret of ['HL73001', 'HL73999', 'Oriel', 'Quennick', 'Testpatient', 'PID|', 'OBX|', '718-7'])
          expect(answer).not.toContain(secret)
      }
      // A search by hospital number or by raw text must not tell an admin who has a message.
      expect((await admin.get('/api/interfaces/hl7/messages?q=HL73999').expect(200)).body.total).toBe(0)
      expect((await admin.get('/api/interfaces/hl7/messages?q=Hemoglobin').expect(200)).body.total).toBe(0)
      expect((await admin.get('/api/interfaces/hl7/messages?q=IF-A2').expect(200)).body.total).toBe(1)
      const id = queue.body.items[0].id
      expect((await admin.get(`/api/interfaces/hl7/messages/${id}`).expect(403)).text).not.toContain('HL73999')
      await admin.post(`/api/interfaces/hl7/messages/${id}/reprocess`).send({}).expect(403)
      // The nurse's view of the same message carries the patient and the segments.
      const seen = await nurse.get(`/api/interfaces/hl7/messages/${id}`).expect(200)
      expect(seen.body.patientMrn).toBe('HL73999')
      expect(seen.body.segments.find((sg: { name: string }) => sg.name === 'PID').fields[2]).toContain('HL73999')
    },
  )

  it('when a message is opened, then it shows segment by segment with its ACK, and the reading is audited', async () => {
    await send(port, oru({ mrn: 'HL73999', control: 'IF-2', obx: [{ value: '99' }] }))
    const { id } = (await nurse.get('/api/interfaces/hl7/messages').expect(200)).body.items[0]
    const res = await nurse.get(`/api/interfaces/hl7/messages/${id}`).expect(200)
    expect(res.body.segments.map((s: { name: string }) => s.name)).toEqual(['MSH', 'PID', 'OBR', 'OBX'])
    expect(res.body.segments[3].fields[4]).toBe('99')
    // Numbered as the standard numbers them: MSH-1 the field separator, MSH-10 the control id.
    expect(res.body.segments[0].fields.slice(0, 3)).toEqual(['|', '^~\\&', 'KVLAB'])
    expect(res.body.segments[0].fields[9]).toBe('IF-2')
    expect(res.body.ack).toContain('MSA|AE|IF-2')
    expect(await AuditEntry.count({ where: { action: 'view', entity: 'hl7_message', entityId: String(id) } })).toBe(1)
  })

  it(
    'when a nurse processes a queued message again after registering the patient, then the result is stored and the queue is empty; ' +
      'a message not in the queue is a 422',
    async () => {
      await send(port, oru({ mrn: 'HL73999', obx: [{ value: '99' }] }))
      const { id } = (await nurse.get('/api/interfaces/hl7/messages?attention=true').expect(200)).body.items[0]
      const still = await nurse.post(`/api/interfaces/hl7/messages/${id}/reprocess`).send({}).expect(200)
      expect(still.body).toMatchObject({ needsAttention: true, attempts: 2 })
      const p = await makePatient({ mrn: 'HL73999' })
      await makeReferral({ patientId: p.id, procedureId: (await makeProcedure()).id, surgeonId: (await makeStaff('surgeon')).id })
      const done = await nurse.post(`/api/interfaces/hl7/messages/${id}/reprocess`).send({}).expect(200)
      expect(done.body).toMatchObject({ needsAttention: false, outcome: 'stored', ackCode: 'AA' })
      expect(await Result.count({ where: { patientId: p.id } })).toBe(1)
      expect(await AuditEntry.count({ where: { action: 'hl7-reprocess' } })).toBe(2)
      const again = await nurse.post(`/api/interfaces/hl7/messages/${id}/reprocess`).send({}).expect(422)
      expect(again.body.error.code).toBe('not_in_queue')
    },
  )

  it('when the query or id is not valid, then the answer is a 4xx naming it', async () => {
    expect((await admin.get('/api/interfaces/hl7/messages?outcome=maybe').expect(400)).body.error.fields.outcome).toMatch(
      /outcome must be one of/,
    )
    expect((await admin.get('/api/interfaces/hl7/messages?pageSize=1000').expect(400)).body.error.fields.pageSize).toMatch(/at most 100/)
    await nurse.get('/api/interfaces/hl7/messages/abc').expect(400)
    await nurse.get('/api/interfaces/hl7/messages/999999').expect(404)
    await nurse.post('/api/interfaces/hl7/messages/999999/reprocess').send({}).expect(404)
  })
})
