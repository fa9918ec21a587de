import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { makeStaff } from '../helpers/factories'
import { Client } from '../helpers/agent'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { ackCode, ackError, oru, send } from '../helpers/hl7'
import { AuditEntry, Hl7MessageRow, Referral, Result } from '../../server/models/index'
import type { MllpListener } from '../../server/services/hl7/listener'
import { startTestListener } from '../helpers/hl7Listener'
import { reprocess } from '../../server/services/hl7/inbox'
import { saveMapping } from '../../server/services/imports/mappings'
import { addDays, todayIso } from '../../shared/pathway'

let t: TestApp
let listener: MllpListener
let port: number
let referralId: number
let surgeonId: number
let procedureId: number

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
  surgeonId = (await makeStaff('surgeon')).id
  procedureId = (await makeProcedure()).id
  const p = await makePatient({ mrn: 'HL70001', sex: 'female', dateOfBirth: '1960-01-01' })
  referralId = (await makeReferral({ patientId: p.id, procedureId, surgeonId }, { plannedSurgeryDate: addDays(todayIso(), 21) })).id
})

const referral = async () => (await Referral.findByPk(referralId, { raw: true }))!
const live = () => Result.findAll({ where: { referralId, voidedAt: null }, raw: true, order: [['id', 'ASC']] })

describe('ORU^R01 results over MLLP', () => {
  it(
    'when a final Hb arrives for a listed patient, then it is stored as a ' + 'result, the episode is re-screened and the ACK is AA',
    async () => {
      const [ack] = await send(port, oru({ mrn: 'HL70001', obx: [{ value: '98', unit: 'g/L' }] }))
      expect(ackCode(ack!)).toBe('AA')
      const rows = await live()
      expect(rows).toMatchObject([{ analyte: 'hb', valueCanonical: 98, source: 'hl7', status: 'final', comparator: null }])
      // 98 g/L in a woman is anaemic by every published threshold (WHO 2024: < 120 g/L non-pregnant women).
      expect(await referral()).toMatchObject({ latestHbGL: 98, anaemic: 1 })
      expect(await AuditEntry.count({ where: { action: 'hl7-results', entityId: String(referralId) } })).toBe(1)
      const msg = (await Hl7MessageRow.findOne({ raw: true }))!
      expect(msg).toMatchObject({ outcome: 'stored', ackCode: 'AA', messageType: 'ORU^R01', patientMrn: 'HL70001', needsAttention: 0 })
    },
  )

  it(
    "when OBX-7 (reference range) and OBX-8 (abnormal flags) are sent, then they are kept on the result row and the episode's " +
      'results show them; a correction carries its own',
    async () => {
      const at = new Date(Date.now() - 5 * 3600_000)
      const [ack] = await send(
        port,
        oru({
          mrn: 'HL70001',
          at,
          obx: [
            { value: '98', range: '120-150', flag: 'L' },
            { code: '2276-4', value: '8', unit: 'ug/L', range: '30-400', flag: 'L~A' },
          ],
        }),
      )
      expect(ackCode(ack!)).toBe('AA')
      expect((await live()).map((r) => [r.analyte, r.referenceRange, r.abnormalFlags])).toEqual([
        ['hb', '120-150', 'L'],
        ['ferritin', '30-400', 'L~A'],
      ])
      const n = await makeStaff('nurse')
      const nurse = await new Client(t.app).mustSignIn(n.email, n.password)
      const episode = await nurse.get(`/api/referrals/${referralId}`).expect(200)
      expect(episode.body.latestResults.hb).toMatchObject({ value: 98, referenceRange: '120-150', abnormalFlags: 'L' })
      expect(episode.body.latestResults.ferritin).toMatchObject({ referenceRange: '30-400', abnormalFlags: 'L~A' })
      await send(port, oru({ mrn: 'HL70001', at, obx: [{ value: '131', range: '120-150', flag: 'N', status: 'C' }] }))
      const hb = (await live()).find((r) => r.analyte === 'hb')!
      expect(hb).toMatchObject({ valueCanonical: 131, status: 'corrected', referenceRange: '120-150', abnormalFlags: 'N' })
      // No range or flag sent: nothing stored, not an empty string.
      await send(port, oru({ mrn: 'HL70001', obx: [{ code: '1988-5', value: '3', unit: 'mg/L' }] }))
      expect((await live()).find((r) => r.analyte === 'crp')).toMatchObject({ referenceRange: null, abnormalFlags: null })
    },
  )

  it(
    'when a newer preliminary Hb arrives and a newer final one is deleted by the laboratory, then the screening, the worklist row, ' +
      'the readiness board and the episode still rest on the final 98 g/L',
    async () => {
      const h = 3600_000
      expect(ackCode((await send(port, oru({ mrn: 'HL70001', obx: [{ value: '98', at: new Date(Date.now() - 48 * h) }] })))[0]!)).toBe('AA')
      expect(
        ackCode((await send(port, oru({ mrn: 'HL70001', obx: [{ value: '141', status: 'P', at: new Date(Date.now() - 24 * h) }] })))[0]!),
      ).toBe('AA')
      const gone = new Date(Date.now() - 12 * h)
      expect(ackCode((await send(port, oru({ mrn: 'HL70001', obx: [{ value: '152', at: gone }] })))[0]!)).toBe('AA')
      expect(ackCode((await send(port, oru({ mrn: 'HL70001', obx: [{ value: '', status: 'X', at: gone }] })))[0]!)).toBe('AA')
      expect(await referral()).toMatchObject({ latestHbGL: 98, anaemic: 1 })
      const n = await makeStaff('nurse')
      const nurse = await new Client(t.app).mustSignIn(n.email, n.password)
      const row = (await nurse.get('/api/worklist').expect(200)).body.rows.find((r: { id: number }) => r.id === referralId)
      expect(row).toMatchObject({ latestHbGL: 98 })
      const board = (await nurse.get('/api/readiness').expect(200)).body.rows.find((r: { id: number }) => r.id === referralId)
      expect(board.planningHbGL).toBe(98)
      const episode = (await nurse.get(`/api/referrals/${referralId}`).expect(200)).body
      expect(episode.screening).toMatchObject({ latestHbGL: 98 })
      // The episode's table shows the preliminary value as preliminary, never the deleted one.
      expect(episode.latestResults.hb).toMatchObject({ value: 141, status: 'preliminary' })
      expect(JSON.stringify(episode.latestResults)).not.toContain('152')
    },
  )

  it('when every supported version sends a result, then each is taken (2.3, 2.3.1, 2.4, 2.5, 2.5.1)', async () => {
    const versions = ['2.3', '2.3.1', '2.4', '2.5', '2.5.1']
    const acks = await send(
      port,
      ...versions.map((version, i) =>
        oru({ mrn: 'HL70001', version, obx: [{ value: String(100 + i), at: new Date(Date.now() - (i + 2) * 3600_000) }] }),
      ),
    )
    expect(acks.map(ackCode)).toEqual(['AA', 'AA', 'AA', 'AA', 'AA'])
    expect(await Result.count({ where: { referralId, source: 'hl7' } })).toBe(5)
  })

  it('when the same control id is sent again, then the same ACK comes back and nothing new is stored', async () => {
    const msg = oru({ mrn: 'HL70001', control: 'DUP-1', obx: [{ value: '101' }] })
    const [first] = await send(port, msg)
    const [again] = await send(port, msg)
    expect(again!.toString()).toBe(first!.toString())
    expect(await Result.count()).toBe(1)
    expect(await Hl7MessageRow.count()).toBe(1)
  })

  it('when the same result comes in a new message, then the natural key keeps one row and the ACK is AA with nothing new', async () => {
    const at = new Date(Date.now() - 5 * 3600_000)
    await send(port, oru({ mrn: 'HL70001', obx: [{ value: '101', at }] }))
    const [ack] = await send(port, oru({ mrn: 'HL70001', obx: [{ value: '101', at }] }))
    expect(ackCode(ack!)).toBe('AA')
    expect(await Result.count()).toBe(1)
    expect(await Hl7MessageRow.findAll({ attributes: ['outcome'], order: [['id', 'ASC']], raw: true })).toEqual([
      { outcome: 'stored' },
      { outcome: 'nothing-new' },
    ])
  })

  it(
    'when a corrected value follows, then it replaces the earlier one, which stays voided as history, and the screening uses the ' +
      'correction',
    async () => {
      const at = new Date(Date.now() - 4 * 3600_000)
      await send(port, oru({ mrn: 'HL70001', obx: [{ value: '98', at }] }))
      const [ack] = await send(port, oru({ mrn: 'HL70001', obx: [{ value: '138', at, status: 'C' }] }))
      expect(ackCode(ack!)).toBe('AA')
      const all = await Result.findAll({ where: { referralId }, raw: true, order: [['id', 'ASC']] })
      expect(all).toHaveLength(2)
      expect(all[0]).toMatchObject({ valueCanonical: 98, status: 'final' })
      expect(all[0]!.voidedAt).not.toBeNull()
      expect(all[0]!.voidReason).toMatch(/corrected by the laboratory/)
      expect(all[1]).toMatchObject({ valueCanonical: 138, status: 'corrected', voidedAt: null })
      // 138 g/L is above the 130 g/L pre-operative threshold (NATA 2017 consensus, Muñoz et al., Anaesthesia 2017).
      expect(await referral()).toMatchObject({ latestHbGL: 138, anaemic: 0 })
      const audit = await AuditEntry.findAll({ where: { action: 'hl7-results' }, order: [['id', 'ASC']], raw: true })
      expect(JSON.stringify(audit[1]!.after)).toContain('result-voided')
    },
  )

  it('when the laboratory deletes a result (OBX-11 X), then it is voided and the screening forgets it', async () => {
    const at = new Date(Date.now() - 4 * 3600_000)
    await send(port, oru({ mrn: 'HL70001', obx: [{ value: '98', at }] }))
    const [ack] = await send(port, oru({ mrn: 'HL70001', obx: [{ value: '', at, status: 'X' }] }))
    expect(ackCode(ack!)).toBe('AA')
    expect(await live()).toEqual([])
    expect(await referral()).toMatchObject({ latestHbGL: null, anaemic: null })
  })

  it('when a preliminary value arrives, then it is kept as preliminary and not screened; its final value replaces it', async () => {
    const at = new Date(Date.now() - 4 * 3600_000)
    await send(port, oru({ mrn: 'HL70001', obx: [{ value: '95', at, status: 'P' }] }))
    expect(await live()).toMatchObject([{ valueCanonical: 95, status: 'preliminary' }])
    expect(await referral()).toMatchObject({ latestHbGL: null })
    await send(port, oru({ mrn: 'HL70001', obx: [{ value: '97', at, status: 'F' }] }))
    expect(await live()).toMatchObject([{ valueCanonical: 97, status: 'final' }])
    expect(await referral()).toMatchObject({ latestHbGL: 97 })
  })

  it(
    'when a value is reported beyond a limit ("<5"), then it is kept ' + 'with its comparator, not as a number the screening uses',
    async () => {
      const [a1] = await send(port, oru({ mrn: 'HL70001', obx: [{ code: '2276-4', value: '<5', unit: 'ug/L' }] }))
      const [a2] = await send(
        port,
        oru({ mrn: 'HL70001', obx: [{ code: '2276-4', type: 'SN', value: '>^1500', unit: 'ug/L', at: new Date(Date.now() - 7200_000) }] }),
      )
      expect([ackCode(a1!), ackCode(a2!)]).toEqual(['AA', 'AA'])
      expect(await live()).toMatchObject([
        { analyte: 'ferritin', comparator: '<', valueReported: 5 },
        { analyte: 'ferritin', comparator: '>', valueReported: 1500 },
      ])
      expect(await referral()).toMatchObject({ ironStatus: null })
    },
  )

  it('when a unit other than the stored one is sent, then the value is converted as elsewhere (Hb 9.8 g/dL is 98 g/L)', async () => {
    await send(port, oru({ mrn: 'HL70001', obx: [{ value: '9.8', unit: 'g/dL' }] }))
    expect(await live()).toMatchObject([{ valueCanonical: 98, unitCanonical: 'g/L', valueReported: 9.8, unitReported: 'g/dL' }])
  })

  it(
    "when a laboratory sends its own code, then the CSV import's saved mapping for that sending facility (MSH-4) is used, from the " +
      'next message after it is saved',
    async () => {
      // The listener keeps each sender's codes between messages: a save must reach the very next one.
      const [before] = await send(port, oru({ mrn: 'HL70001', obx: [{ code: 'ZZHB1', system: 'L', value: '131' }] }))
      expect(ackCode(before!)).toBe('AE')
      const n = await makeStaff('nurse')
      await saveMapping(t.sequelize, { userId: n.id, role: 'nurse', requestId: 'test', ip: null }, 'KVH-PATH', {
        columns: { mrn: 'mrn', code: 'test_code', value: 'value', unit: 'unit', takenAt: 'taken_at' },
        delimiter: ',',
        dateOrder: 'iso',
        codes: { ZZHB1: 'hb' },
      })
      const [ok] = await send(port, oru({ mrn: 'HL70001', obx: [{ code: 'ZZHB1', system: 'L', value: '131' }] }))
      expect(ackCode(ok!)).toBe('AA')
      const [other] = await send(port, oru({ mrn: 'HL70001', facility: 'ELSEWHERE', obx: [{ code: 'ZZHB1', system: 'L', value: '132' }] }))
      expect(ackCode(other!)).toBe('AE')
      expect(ackError(other!)).toMatch(/ZZHB1/)
    },
  )

  it(
    'when the MRN is unknown, then the ACK is AE with the reason in ERR, the message waits in the queue, and after registration it ' +
      'is processed again',
    async () => {
      const [ack] = await send(port, oru({ mrn: 'HL79999', obx: [{ value: '99' }] }))
      expect(ackCode(ack!)).toBe('AE')
      expect(ackError(ack!)).toBe('no patient has MRN HL79999')
      expect(ack!.getSegment('ERR')!.getComponent(3, 1)).toBe('204')
      expect(await Result.count()).toBe(0)
      const queued = (await Hl7MessageRow.findOne({ raw: true }))!
      expect(queued).toMatchObject({ outcome: 'error', needsAttention: 1, errorCode: 'unknown-mrn' })
      const p = await makePatient({ mrn: 'HL79999' })
      await makeReferral({ patientId: p.id, procedureId, surgeonId })
      expect(await reprocess(t.sequelize, t.config, queued.id)).toMatchObject({ outcome: 'stored', errorText: null })
      expect(await Result.count({ where: { patientId: p.id } })).toBe(1)
      expect(await Hl7MessageRow.findByPk(queued.id, { raw: true })).toMatchObject({ needsAttention: 0, ackCode: 'AA', attempts: 2 })
    },
  )

  it('when the patient has no open episode, an implausible value, or an assigning authority not ours, then AE says which', async () => {
    const p = await makePatient({ mrn: 'HL70002' })
    await makeReferral({ patientId: p.id, procedureId, surgeonId }, { stage: 'withdrawn' })
    const acks = await send(
      port,
      oru({ mrn: 'HL70002', obx: [{ value: '99' }] }),
      oru({ mrn: 'HL70001', obx: [{ value: '9.8', unit: 'g/L' }] }),
      oru({ mrn: 'HL70001', authority: 'OTHERHOSP', obx: [{ value: '99' }] }),
    )
    expect(acks.map(ackCode)).toEqual(['AE', 'AE', 'AE'])
    expect(ackError(acks[0]!)).toMatch(/no open episode/)
    expect(ackError(acks[1]!)).toMatch(/g\/dL/)
    expect(ackError(acks[2]!)).toMatch(/OTHERHOSP/)
    expect(await Result.count()).toBe(0)
    expect(await Hl7MessageRow.count({ where: { needsAttention: true } })).toBe(3)
  })

  it('when the version or message type is not supported, then the ACK is AR and nothing is queued', async () => {
    const old = oru({ mrn: 'HL70001', version: '2.2', obx: [{ value: '99' }] })
    const other = oru({ mrn: 'HL70001', obx: [{ value: '99' }] }).replace('ORU^R01^ORU_R01', 'MDM^T02')
    const [a1, a2] = await send(port, old, other)
    expect([ackCode(a1!), ackCode(a2!)]).toEqual(['AR', 'AR'])
    expect(ackError(a1!)).toMatch(/version "2.2"/)
    expect(ackError(a2!)).toMatch(/MDM\^T02/)
    expect(await Result.count()).toBe(0)
    expect(await Hl7MessageRow.count({ where: { outcome: 'rejected', needsAttention: false } })).toBe(2)
  })

  it('when iron and transferrin of one sample arrive, then TSAT is derived as for typed-in results', async () => {
    const at = new Date(Date.now() - 3 * 3600_000)
    await send(
      port,
      oru({
        mrn: 'HL70001',
        obx: [
          { code: '2498-4', value: '10', unit: 'umol/L', at },
          { code: '3034-6', value: '2.5', unit: 'g/L', at },
        ],
      }),
    )
    const tsat = await Result.findOne({ where: { referralId, analyte: 'tsat' }, raw: true })
    expect(tsat).toMatchObject({ source: 'derived' })
  })
})
