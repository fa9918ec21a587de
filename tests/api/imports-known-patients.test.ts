import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, type TestApp } from '../helpers/app'
import type { Client } from '../helpers/agent'
import { csv, HEADER, importSetUp, takenHoursAgo, uploadCsv } from '../helpers/importFixtures'
import { makePatient, makeReferral } from '../helpers/pathwayFactories'
import { checkCsvFields, DEFAULT_MAPPING, mappedColumnIndexes, type Checked } from '../../shared/imports'
import { addDays, todayIso } from '../../shared/pathway'
import { findPatients, matchChunk, type ChunkOutcome } from '../../server/services/imports/match'
import { KnownPatients } from '../../server/services/imports/knownPatients'
import { ImportRun } from '../../server/services/imports/run'

// An import run asks the database for each MRN's patient once (knownPatients.ts): these check
// that its remembered answer is the one a re-read inside the run's transaction gives.
let t: TestApp
let c: Client
let ctx: Awaited<ReturnType<typeof importSetUp>>
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  ctx = await importSetUp(t, 'KNP0001', { plannedSurgeryDate: addDays(todayIso(), 14) })
  c = ctx.c
})

const closeEpisode = (id: number) =>
  // Another session (a pooled connection of its own, autocommit), as a clinician closing the episode would.
  t.sequelize.query("UPDATE referrals SET stage = 'closed' WHERE id = ?", { type: QueryTypes.UPDATE, replacements: [id] })

describe('the run’s snapshot', () => {
  it(
    'when another session closes the episode after the run first read the patient, then a re-read inside the run’s ' +
      'transaction still finds it open (REPEATABLE READ), while a read outside finds it closed',
    async () => {
      const tx = await t.sequelize.transaction()
      try {
        expect((await findPatients(t.sequelize, ['KNP0001'], tx)).get('KNP0001')?.referralId).toBe(ctx.referralId)
        await closeEpisode(ctx.referralId)
        expect((await findPatients(t.sequelize, ['KNP0001'])).get('KNP0001')?.referralId).toBeNull()
        expect((await findPatients(t.sequelize, ['KNP0001'], tx)).get('KNP0001')?.referralId).toBe(ctx.referralId)
      } finally {
        await tx.rollback()
      }
    },
  )

  it(
    'when the episode is closed between two chunks of one run, then the second chunk’s row is matched to it as the first ' +
      'was, and a run started afterwards skips the row as having no open episode',
    async () => {
      const row = (hours: number) => ({ row: 2, checked: check(['KNP0001', 'HB', '120', 'g/L', takenHoursAgo(hours)]) })
      const viewer = { userId: ctx.nurse.id, role: 'nurse' as const, requestId: null, ip: null }
      const run = new ImportRun(t.sequelize, viewer, { kind: 'lab-csv', commit: false, sourceName: 'Test', fileName: 'x.csv' })
      await run.begin()
      try {
        expect((await run.addChunk([row(5)])).accepted).toHaveLength(1)
        await closeEpisode(ctx.referralId)
        expect((await run.addChunk([row(6)])).accepted.map((m) => m.referralId)).toEqual([ctx.referralId])
      } finally {
        await run.abandon()
      }
      const after = await uploadCsv(c, csv([HEADER, ['KNP0001', 'HB', 120, 'g/L', takenHoursAgo(7)]])).expect(200)
      expect(after.body.skipped).toEqual([expect.objectContaining({ code: 'no-open-referral' })])
    },
  )
})

const at = mappedColumnIndexes(HEADER, DEFAULT_MAPPING)
const check = (fields: string[]): Checked => checkCsvFields(fields, at, DEFAULT_MAPPING, 'Europe/London', Date.now())

describe('remembered answers', () => {
  it(
    'when three chunks repeat an MRN in other spellings, an unknown MRN, a patient with only a closed episode and a time ' +
      'before birth, then every row’s outcome and reason equals asking again for each chunk, with one patient statement',
    async () => {
      const closedOnly = await makePatient({ mrn: 'KNP0002' })
      await makeReferral({ patientId: closedOnly.id, procedureId: ctx.procedureId, surgeonId: ctx.surgeonId }, { stage: 'closed' })
      await makePatient({ mrn: 'KNP0003', dateOfBirth: '1995-03-01' }).then((p) =>
        makeReferral({ patientId: p.id, procedureId: ctx.procedureId, surgeonId: ctx.surgeonId }),
      )
      const mrns = ['KNP0001', 'knp0001', ' KNP0001', 'KNP0002', 'ZZ404', 'KNP0003', '']
      const chunks = [0, 1, 2].map((k) =>
        Array.from({ length: 40 }, (_, i) => {
          const n = k * 40 + i
          const taken = i % 9 === 5 ? '1992-06-01T10:00:00Z' : takenHoursAgo(1 + (n % 30)) // some rows repeat: duplicates in the file
          return { row: n + 2, checked: check([mrns[n % mrns.length]!, 'HB', String(100 + (n % 7)), 'g/L', taken]) }
        }),
      )
      const statements: string[] = []
      const options = (t.sequelize as unknown as { options: { logging?: unknown } }).options
      const outcomes = async (known?: KnownPatients) => {
        const tx = await t.sequelize.transaction()
        const seen = new Set<string>()
        const out: ChunkOutcome[] = []
        try {
          for (const items of chunks) out.push(await matchChunk(t.sequelize, items, { batchId: null, seen, patients: known }, tx))
        } finally {
          await tx.rollback()
        }
        return out
      }
      const asked = await outcomes()
      options.logging = (sql: string) => statements.push(sql)
      try {
        const remembered = await outcomes(new KnownPatients())
        expect(remembered).toEqual(asked)
      } finally {
        options.logging = false
      }
      expect(statements.filter((s) => s.includes('FROM patients p'))).toHaveLength(1)
      const codes = asked.flatMap((o) => o.skipped.map((s) => s.code))
      expect(new Set(codes)).toEqual(new Set(['unknown-mrn', 'no-open-referral', 'bad-date', 'duplicate-in-file']))
      expect(asked.flatMap((o) => o.accepted).length).toBeGreaterThan(0)
    },
  )
})
