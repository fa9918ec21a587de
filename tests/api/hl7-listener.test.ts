import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { makeStaff } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { ackCode, END, oru, rawExchange, send, VT } from '../helpers/hl7'
import { Hl7MessageRow, Result } from '../../server/models/index'
import type { MllpListener } from '../../server/services/hl7/listener'
import { startTestListener } from '../helpers/hl7Listener'

let t: TestApp
let listener: MllpListener
let port: number
const MAX = 64 * 1024

beforeAll(async () => {
  t = makeTestApp()
  // Small limits so the test is quick; the defaults (1 MB, 30 s, 300 s) are the same code path.
  ;({ listener, port } = await startTestListener(t.sequelize, t.config, {
    maxMessageBytes: MAX,
    partialTimeoutSeconds: 1,
    idleTimeoutSeconds: 3,
    maxConnections: 50,
  }))
})
afterAll(async () => {
  await listener.stop()
  await t.close()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  const p = await makePatient({ mrn: 'HL71001' })
  await makeReferral({ patientId: p.id, procedureId: (await makeProcedure()).id, surgeonId: (await makeStaff('surgeon')).id })
})

const stillAnswers = async () => {
  const [ack] = await send(port, oru({ mrn: 'HL71001', obx: [{ value: '120' }] }))
  expect(ackCode(ack!)).toBe('AA')
}

describe('the MLLP listener and what it is sent', () => {
  it('when a frame holds no HL7 message, then the answer is AR, nothing is stored, and the listener keeps answering', async () => {
    const { received } = await rawExchange(port, [`${VT}this is not HL7${END}`])
    expect(received).toContain('MSA|AR|')
    expect(received).toContain('not a readable HL7 v2 message')
    expect(await Hl7MessageRow.count()).toBe(0)
    await stillAnswers()
  })

  it(
    'when a message has a header but no control id, or is only a bare MSH, then the answer is AR, nothing is stored, and the ' +
      'listener keeps answering',
    async () => {
      const noId = oru({ mrn: 'HL71001', control: '', obx: [{ value: '120' }] })
      const { received } = await rawExchange(port, [`${VT}${noId}${END}`, `${VT}MSH|${END}`], { waitMs: 2000 })
      expect(received.match(/MSA\|AR\|/g)?.length).toBe(2)
      expect(received).toContain('control id is empty')
      expect(await Hl7MessageRow.count()).toBe(0)
      await stillAnswers()
    },
  )

  it(
    'when a message is larger than the limit, then the ' + 'connection is closed with AR and nothing is stored',
    { timeout: 15_000 },
    async () => {
      const big = oru({ mrn: 'HL71001', obx: [{ value: '120' }] }) + '\rNTE|1||' + 'x'.repeat(MAX + 10)
      const { received, closedByServer } = await rawExchange(port, [VT, big, END], { waitMs: 8000 })
      expect(closedByServer).toBe(true)
      expect(received).toContain('MSA|AR|')
      expect(received).toContain('exceeds')
      expect(await Hl7MessageRow.count()).toBe(0)
      expect(await Result.count()).toBe(0)
      await stillAnswers()
    },
  )

  it('when the connection drops mid-message, then nothing is stored', async () => {
    const msg = oru({ mrn: 'HL71001', obx: [{ value: '120' }] })
    await rawExchange(port, [VT, msg.slice(0, msg.length - 20)], { waitMs: 200, end: true })
    await new Promise((r) => setTimeout(r, 300))
    expect(await Hl7MessageRow.count()).toBe(0)
    expect(await Result.count()).toBe(0)
  })

  it(
    'when a frame is left unfinished past the partial-frame timeout, then ' + 'the listener closes the connection and stores nothing',
    async () => {
      const msg = oru({ mrn: 'HL71001', obx: [{ value: '120' }] })
      const started = Date.now()
      const { closedByServer } = await rawExchange(port, [VT, msg], { waitMs: 4000 })
      expect(closedByServer).toBe(true)
      expect(Date.now() - started).toBeLessThan(3500)
      expect(await Hl7MessageRow.count()).toBe(0)
    },
  )

  it('when a connection stays silent past the idle timeout, then it is closed', async () => {
    const { closedByServer } = await rawExchange(port, [], { waitMs: 6000 })
    expect(closedByServer).toBe(true)
  }, 10_000)

  it('when two messages arrive in one TCP write, then both are answered in order', async () => {
    const a = oru({ mrn: 'HL71001', control: 'PAIR-1', obx: [{ value: '120', at: new Date(Date.now() - 7200_000) }] })
    const b = oru({ mrn: 'HL71001', control: 'PAIR-2', obx: [{ value: '121' }] })
    const { received } = await rawExchange(port, [`${VT}${a}${END}${VT}${b}${END}`], { waitMs: 1500 })
    expect(received.indexOf('MSA|AA|PAIR-1')).toBeGreaterThan(-1)
    expect(received.indexOf('MSA|AA|PAIR-2')).toBeGreaterThan(received.indexOf('MSA|AA|PAIR-1'))
    expect(await Result.count({ where: { source: 'hl7' } })).toBe(2)
  })

  it('when twenty connections send at once, then every message is stored exactly once', async () => {
    const base = Date.now() - 30 * 3600_000
    const acks = await Promise.all(
      Array.from({ length: 20 }, (_, i) =>
        send(port, oru({ mrn: 'HL71001', obx: [{ value: String(100 + i), at: new Date(base + i * 60_000) }] })),
      ),
    )
    expect(acks.flat().map(ackCode)).toEqual(Array(20).fill('AA'))
    expect(await Hl7MessageRow.count()).toBe(20)
    expect(await Result.count({ where: { source: 'hl7' } })).toBe(20)
  })

  it(
    'when messages from many connections are stored together and some fail or repeat, then each gets its ' +
      'own answer and a resend changes nothing',
    async () => {
      const base = Date.now() - 50 * 3600_000
      const good = Array.from({ length: 8 }, (_, i) =>
        oru({ mrn: 'HL71001', control: `GC-OK-${i}`, obx: [{ value: String(110 + i), at: new Date(base + i * 60_000) }] }),
      )
      const unknown = [0, 1].map((i) => oru({ mrn: 'HL79999', control: `GC-AE-${i}`, obx: [{ value: '99' }] }))
      const old = oru({ mrn: 'HL71001', control: 'GC-AR', version: '2.2', obx: [{ value: '98' }] })
      const dup = oru({ mrn: 'HL71001', control: 'GC-DUP', obx: [{ value: '97', at: new Date(base - 60_000) }] })
      const all = [...good, ...unknown, old, dup, dup]
      const first = (await Promise.all(all.map((m) => send(port, m)))).flat()
      expect(first.map(ackCode)).toEqual([...Array(8).fill('AA'), 'AE', 'AE', 'AR', 'AA', 'AA'])
      // The two copies sent at once get the very same answer; the message and its result are stored once.
      expect(first[12]!.toString()).toBe(first[11]!.toString())
      expect(await Hl7MessageRow.count()).toBe(12)
      expect(await Hl7MessageRow.count({ where: { needsAttention: true } })).toBe(2)
      expect(await Result.count({ where: { source: 'hl7' } })).toBe(9)
      // Several messages went into one transaction, so the failures above were rolled back alone.
      expect(listener.batchStats().largest).toBeGreaterThan(1)
      const again = (await Promise.all(all.map((m) => send(port, m)))).flat()
      expect(again.map((a) => a.toString())).toEqual(first.map((a) => a.toString()))
      expect(await Hl7MessageRow.count()).toBe(12)
      expect(await Result.count({ where: { source: 'hl7' } })).toBe(9)
    },
  )
})
