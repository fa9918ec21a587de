import { execFile } from 'node:child_process'
import path from 'node:path'
import { promisify } from 'node:util'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { loadDemoScenario } from '../../seed/load'
import { DEMO_PASSWORD } from '../../seed/demo/staff'
import { Hl7MessageRow } from '../../server/models/index'
import type { MllpListener } from '../../server/services/hl7/listener'
import { startTestListener } from '../helpers/hl7Listener'

const run = promisify(execFile)
const root = path.resolve(import.meta.dirname, '../..')
let t: TestApp
let listener: MllpListener
let port: number

beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  expect(await loadDemoScenario(t.sequelize)).toBe(true)
  ;({ listener, port } = await startTestListener(t.sequelize, t.config))
})
afterAll(async () => {
  await listener.stop()
  await cleanDatabase(t.sequelize)
  await t.close()
})

/** `npm run hl7:send -- FILES`, as a person would run it, against this test's listener. */
async function hl7Send(...files: string[]): Promise<string> {
  const { stdout } = await run(path.join(root, 'node_modules/.bin/tsx'), ['scripts/hl7-send.ts', ...files.map((f) => `seed/hl7/${f}`)], {
    cwd: root,
    env: { ...process.env, HL7_MLLP_HOST: '127.0.0.1', HL7_MLLP_PORT: String(port) },
  })
  return stdout
}

async function adaOnWorklist(c: Client) {
  const res = await c.get('/api/worklist?q=KV100200')
  expect(res.status).toBe(200)
  return (res.body.rows as { mrn: string; latestHbGL: number | null; anaemic: boolean | null; ironStatus: string | null }[]).find(
    (r) => r.mrn === 'KV100200',
  )!
}

const rowOf = async (c: Client, mrn: string) =>
  ((await c.get(`/api/worklist?q=${mrn}`)).body.rows as { mrn: string; plannedSurgeryDate: string; flags: string[] }[]).find(
    (r) => r.mrn === mrn,
  )!

describe('the invented sample messages in seed/hl7, sent with npm run hl7:send', () => {
  it(
    "when the laboratory's results for Ada Larkspur are sent, then her worklist row shows the Hb and the anaemia, and the " +
      'correction then replaces it',
    async () => {
      const nurse = await new Client(t.app).mustSignIn('nurse@ferrolane.test', DEMO_PASSWORD)
      expect(await adaOnWorklist(nurse)).toMatchObject({ latestHbGL: null, anaemic: null })
      expect(await hl7Send('01-ada-results.hl7')).toContain('AA DEMO-LAB-0001')
      expect(await adaOnWorklist(nurse)).toMatchObject({ latestHbGL: 104, anaemic: true, ironStatus: 'absolute-deficiency' })
      expect(await hl7Send('02-ada-correction.hl7')).toContain('AA DEMO-LAB-0002')
      expect(await adaOnWorklist(nurse)).toMatchObject({ latestHbGL: 110, anaemic: true })
    },
    150_000,
  )

  it(
    'when the result for an unknown patient is sent, then the command prints ' + 'AE with the reason and the message waits for attention',
    async () => {
      const out = await hl7Send('03-unknown-patient.hl7')
      expect(out).toContain('AE DEMO-LAB-0003 — no patient has MRN KV999901')
      expect(await Hl7MessageRow.count({ where: { needsAttention: true } })).toBe(1)
    },
    150_000,
  )

  it(
    "when the theatre system books and then moves Bram Thistlewood's operation, then the worklist shows the new date and the " +
      'date-change flag',
    async () => {
      const nurse = await new Client(t.app).mustSignIn('nurse@ferrolane.test', DEMO_PASSWORD)
      const out = await hl7Send('04-bram-theatre-move.hl7')
      expect(out).toContain('AA DEMO-THR-0001')
      expect(out).toContain('AA DEMO-THR-0002')
      expect(await rowOf(nurse, 'KV100237')).toMatchObject({
        plannedSurgeryDate: '2027-02-08',
        flags: expect.arrayContaining(['date-change-requested']),
      })
    },
    150_000,
  )
})
