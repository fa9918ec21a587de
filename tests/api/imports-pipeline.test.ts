import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, type TestApp } from '../helpers/app'
import type { Client } from '../helpers/agent'
import { csv, HEADER, importSetUp, uploadCsv } from '../helpers/importFixtures'
import { AuditEntry, ImportBatch, Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

// The import parses and checks the next chunk of 1000 rows while the previous one is matched and
// stored (labCsv.ts): these are the failures that meet in that overlap.
let t: TestApp
let c: Client
beforeAll(() => {
  // A row limit below the 4000-row files: an error the loop itself meets at a known row, after reading ahead of the database.
  t = makeTestApp({ IMPORT_MAX_CSV_ROWS: '3500' })
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  ;({ c } = await importSetUp(t, 'PIP0001', { plannedSurgeryDate: addDays(todayIso(), 14) }))
})

/** `n` Hb rows a minute apart as CSV lines (no header); row i (0-based) is line i + 2 of the file. */
function hbLines(n: number, value: (i: number) => number = () => 140): string[] {
  const base = Date.now() - 90 * 86_400_000
  return Array.from({ length: n }, (_, i) => csv([['PIP0001', 'HB', value(i), 'g/L', new Date(base + i * 60_000).toISOString()]]).trimEnd())
}
const file = (lines: string[]) => `${HEADER.join(',')}\r\n${lines.join('\r\n')}\r\n`

async function nothingStored() {
  expect(await Result.count()).toBe(0)
  expect(await ImportBatch.count()).toBe(0)
  expect(await AuditEntry.count({ where: { action: ['import', 'import-results'] } })).toBe(0)
}

describe('an error while the previous chunk is in flight', () => {
  it('when line 2503 is unreadable CSV (chunk 2 in flight), then 422 names that line and nothing is stored', async () => {
    const lines = hbLines(3000)
    lines[2501] = `PIP0001,"HB"x,140,g/L,2026-01-05T09:00:00Z`
    const res = await uploadCsv(c, file(lines), { commit: true })
    expect(res.status).toBe(422)
    expect(res.body.error).toMatchObject({ code: 'csv_unreadable', message: expect.stringContaining('at line 2503') })
    await nothingStored()
  })

  it('when the preview of the same file meets the same line, then it answers the same 422 and leaves nothing', async () => {
    const lines = hbLines(3000)
    lines[2501] = `PIP0001,"HB"x,140,g/L,2026-01-05T09:00:00Z`
    const commit = await uploadCsv(c, file(lines), { commit: true })
    const preview = await uploadCsv(c, file(lines))
    expect(preview.status).toBe(422)
    expect(preview.body).toEqual(commit.body)
    await nothingStored()
  })

  it(
    'when the database refuses a row of chunk 2 and the file passes the row limit while chunk 3 waits for that answer, then ' +
      "the database's refusal is the answer, as when each chunk was awaited before the next row was read, and nothing is stored",
    async () => {
      // A real failure inside MariaDB, half a second late: a trigger refuses one marker value (row 1500, in chunk 2).
      // Chunk 2's insert is sent unawaited; chunk 3's duplicate look-up waits for it, while the loop reads on past
      // row 3500, the limit. Awaited chunk by chunk, the import never read row 3501.
      await t.sequelize.query(
        `CREATE TRIGGER imports_pipeline_refuse BEFORE INSERT ON results FOR EACH ROW
       BEGIN IF NEW.value_reported = 77.7 THEN DO SLEEP(0.5); SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'refused by the test trigger';
       END IF; END`,
        { type: QueryTypes.RAW },
      )
      try {
        const res = await uploadCsv(c, file(hbLines(4000, (i) => (i === 1499 ? 77.7 : 140))), { commit: true })
        expect(res.status).toBe(500)
        await nothingStored()
        // The run's connection went back to the pool clean: the next import stores its rows.
        await t.sequelize.query('DROP TRIGGER IF EXISTS imports_pipeline_refuse', { type: QueryTypes.RAW })
        const again = await uploadCsv(c, file(hbLines(1200)), { commit: true }).expect(201)
        expect(again.body.accepted).toBe(1200)
        expect(await Result.count({ where: { importBatchId: again.body.batchId } })).toBe(1200)
      } finally {
        await t.sequelize.query('DROP TRIGGER IF EXISTS imports_pipeline_refuse', { type: QueryTypes.RAW })
      }
    },
  )

  it('when a 4000-row file passes the row limit of 3500 with no other fault, then 400 says so and nothing is stored', async () => {
    const res = await uploadCsv(c, file(hbLines(4000)), { commit: true })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toContain('more than 3500 data rows')
    await nothingStored()
  })
})
