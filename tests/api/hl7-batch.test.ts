import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { makeStaff } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { Hl7Message } from '@medplum/core'
import { ackCode, ackError, oru, send } from '../helpers/hl7'
import { AuditEntry, Hl7MessageRow, Referral, Result } from '../../server/models/index'
import type { MllpListener } from '../../server/services/hl7/listener'
import { oruBatchStats } from '../../server/services/hl7/oruBatchWrite'
import { startTestListener } from '../helpers/hl7Listener'
import { receive } from '../../server/services/hl7/inbox'

let t: TestApp
let listener: MllpListener
let port: number
const referrals: number[] = []
const MRNS = ['HB70001', 'HB70002', 'HB70003', 'HB70004', 'HB70005', 'HB70006']

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
  referrals.length = 0
  const procedureId = (await makeProcedure()).id
  const surgeonId = (await makeStaff('surgeon')).id
  for (const mrn of MRNS) {
    const p = await makePatient({ mrn, sex: 'female', dateOfBirth: '1958-04-01' })
    referrals.push((await makeReferral({ patientId: p.id, procedureId, surgeonId })).id)
  }
})

describe('HL7 results stored a batch at a time', () => {
  it(
    'when new results, one control id twice at once, an unknown MRN and a value already stored arrive together over ' +
      'several connections, then each gets the answer the per-message rules give, and a resend changes nothing',
    async () => {
      const at = new Date(Date.now() - 26 * 3600_000)
      // HB70006's Hb of that sample is stored first, by an earlier message: the batch's copy of it is nothing new.
      const [pre] = await send(port, oru({ mrn: 'HB70006', control: 'BT-PRE', at, obx: [{ value: '101' }] }))
      expect(ackCode(pre!)).toBe('AA')
      const fresh = MRNS.slice(0, 5).map((mrn, i) => oru({ mrn, control: `BT-NEW-${i}`, at, obx: [{ value: String(95 + i) }] }))
      const twice = oru({ mrn: 'HB70006', control: 'BT-TWICE', at: new Date(at.getTime() - 3600_000), obx: [{ value: '104' }] })
      const unknown = oru({ mrn: 'HB79999', control: 'BT-UNKNOWN', obx: [{ value: '99' }] })
      const known = oru({ mrn: 'HB70006', control: 'BT-KNOWN', at, obx: [{ value: '101' }] })
      const all = [...fresh, twice, twice, unknown, known]
      const batchesBefore = oruBatchStats.batches
      // Two waves, so which path a wave takes does not hang on arrival timing: the five new results
      // (five episodes) take the batch path however they are grouped; the second wave (three
      // messages for one episode) may be grouped either way, and its answers must be the same.
      const sendAll = async (ms: string[]) => (await Promise.all(ms.map((m) => send(port, m)))).flat()
      const first = [...(await sendAll(fresh)), ...(await sendAll([twice, twice, unknown, known]))]

      expect(first.map(ackCode)).toEqual([...Array(7).fill('AA'), 'AE', 'AA'])
      expect(first[6]!.toString()).toBe(first[5]!.toString())
      expect(ackError(first[7]!)).toBe('no patient has MRN HB79999')
      // The batch path took them (several messages to a transaction), not the per-message one.
      expect(oruBatchStats.batches).toBeGreaterThan(batchesBefore)
      expect(listener.batchStats().largest).toBeGreaterThan(1)

      const rows = await Hl7MessageRow.findAll({ raw: true, order: [['controlId', 'ASC']] })
      expect(rows.map((r) => [r.controlId, r.outcome, r.ackCode, r.needsAttention ? 1 : 0])).toEqual([
        ['BT-KNOWN', 'nothing-new', 'AA', 0],
        ['BT-NEW-0', 'stored', 'AA', 0],
        ['BT-NEW-1', 'stored', 'AA', 0],
        ['BT-NEW-2', 'stored', 'AA', 0],
        ['BT-NEW-3', 'stored', 'AA', 0],
        ['BT-NEW-4', 'stored', 'AA', 0],
        ['BT-PRE', 'stored', 'AA', 0],
        ['BT-TWICE', 'stored', 'AA', 0],
        ['BT-UNKNOWN', 'error', 'AE', 1],
      ])
      const byId = new Map(rows.map((r) => [r.controlId, r]))
      expect(byId.get('BT-KNOWN')!.changes).toEqual([])
      expect(byId.get('BT-UNKNOWN')).toMatchObject({ errorCode: 'unknown-mrn', errorText: 'no patient has MRN HB79999', changes: null })
      for (const r of rows) expect(r.ack).toBe(first[all.findIndex((m) => m.includes(`|${r.controlId}|`))]?.toString() ?? r.ack)

      // One result per new value, each named by its message; the value already stored is not stored twice.
      const results = await Result.findAll({ where: { source: 'hl7' }, raw: true, order: [['id', 'ASC']] })
      expect(results).toHaveLength(7)
      for (const [i, referralId] of referrals.slice(0, 5).entries()) {
        const msg = byId.get(`BT-NEW-${i}`)!
        const result = results.find((r) => r.hl7MessageId === msg.id)!
        expect(result).toMatchObject({ referralId, analyte: 'hb', valueCanonical: 95 + i, status: 'final', voidedAt: null })
        expect(msg.changes).toEqual([{ kind: 'result-added', resultId: result.id, referralId, analyte: 'hb', detail: `${95 + i} g/L` }])
        // Re-screened: every one of these Hb values is below 120 g/L (WHO 2024, non-pregnant women).
        expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ latestHbGL: 95 + i, anaemic: 1 })
        const audits = await AuditEntry.findAll({ where: { action: 'hl7-results', entityId: String(referralId) }, raw: true })
        expect(audits).toHaveLength(1)
        expect(audits[0]).toMatchObject({ userId: null, entity: 'referral', requestId: `hl7:${msg.id}`, ip: null })
        expect(audits[0]!.before).toMatchObject({ screening: { latestHbGL: null, anaemic: null } })
        expect(audits[0]!.after).toMatchObject({
          hl7MessageId: msg.id,
          controlId: `BT-NEW-${i}`,
          changes: msg.changes,
          screening: { latestHbGL: 95 + i, anaemic: true, severity: expect.any(String) },
        })
      }
      // HB70006: the earlier message and the control id sent twice each brought one value and one audit row; the known value none.
      expect(await AuditEntry.count({ where: { action: 'hl7-results', entityId: String(referrals[5]) } })).toBe(2)
      expect(await Result.count({ where: { referralId: referrals[5], source: 'hl7' } })).toBe(2)

      const again = (await Promise.all(all.map((m) => send(port, m)))).flat()
      expect(again.map((a) => a.toString())).toEqual(first.map((a) => a.toString()))
      expect(await Hl7MessageRow.count()).toBe(9)
      expect(await Result.count({ where: { source: 'hl7' } })).toBe(7)
      expect(await AuditEntry.count({ where: { action: 'hl7-results' } })).toBe(7)
    },
  )

  it(
    'when four senders each wait for their ACK before the next message, then their messages are stored ' +
      'together rather than one by one, each exactly once',
    async () => {
      const base = Date.now() - 80 * 3600_000
      const before = { ...oruBatchStats }
      const acks = await Promise.all(
        MRNS.slice(0, 4).map((mrn, c) =>
          send(
            port,
            ...Array.from({ length: 12 }, (_, i) =>
              oru({ mrn, control: `LS-${c}-${i}`, obx: [{ value: String(100 + i), at: new Date(base + i * 60_000) }] }),
            ),
          ),
        ),
      )
      expect(acks.flat().map(ackCode)).toEqual(Array(48).fill('AA'))
      expect(await Result.count({ where: { source: 'hl7' } })).toBe(48)
      expect(await Hl7MessageRow.count({ where: { outcome: 'stored' } })).toBe(48)
      // Without waiting for the senders just answered, batches alternate 1 and 3 messages (2 on average).
      const perBatch = (oruBatchStats.messages - before.messages) / (oruBatchStats.batches - before.batches)
      expect(perBatch).toBeGreaterThan(2.5)
    },
  )

  it(
    'when another server stores the same control id while the batch is being written, then the batch path gives way ' +
      'and the message gets the answer stored there',
    async () => {
      const text = oru({ mrn: 'HB70001', control: 'BT-RACE', obx: [{ value: '97' }] })
      // Another node's transaction holds the control id (not yet committed: the batch's read does not see it).
      const other = await t.sequelize.transaction()
      const now = new Date()
      await Hl7MessageRow.create(
        {
          receivedAt: now,
          controlId: 'BT-RACE',
          sendingApp: 'KVLAB',
          sendingFacility: 'KVH-PATH',
          messageType: 'ORU^R01',
          version: '2.5.1',
          raw: text,
          outcome: 'stored',
          ackCode: 'AA',
          ack: 'ANSWER-FROM-THE-OTHER-NODE',
          errorCode: null,
          errorText: null,
          changes: [],
          patientMrn: 'HB70001',
          needsAttention: false,
          processedAt: now,
        },
        { transaction: other },
      )
      const answer = receive(t.sequelize, t.config, Hl7Message.parse(text))
      await new Promise((r) => setTimeout(r, 300))
      await other.commit()
      expect(await answer).toBe('ANSWER-FROM-THE-OTHER-NODE')
      expect(await Hl7MessageRow.count({ where: { controlId: 'BT-RACE' } })).toBe(1)
      expect(await Result.count({ where: { source: 'hl7' } })).toBe(0)
    },
  )
})
