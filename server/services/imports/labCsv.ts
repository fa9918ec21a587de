import { createHash } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { pipeline } from 'node:stream'
import { setImmediate as yieldToIo } from 'node:timers/promises'
import { parse, CsvError } from 'csv-parse'
import type { Sequelize } from 'sequelize'
import {
  checkCsvFields,
  mappedColumnIndexes,
  MAPPED_FIELDS,
  type Checked,
  type ColumnMapping,
  type MappedField,
} from '../../../shared/imports'
import { Invalid, RuleRefused } from '../../errors'
import { LIMITS } from '../../../shared/limits'
import type { Viewer } from '../viewer'
import type { ImportSummary } from '../../../shared/imports'
import { ImportRun } from './run'

export interface LabCsvInput {
  filePath: string
  fileName: string
  sourceName: string
  mapping: ColumnMapping
  commit: boolean
}

const CHUNK = 1000
/** Rows parsed between two turns of the event loop, so the chunk in flight's answers are read promptly. */
const YIELD_EVERY = 200

/** How many distinct header names the first `count` fields of a short or long row fill (the keys an object of them would have). */
function distinctNames(header: readonly string[], count: number): number {
  return new Set(header.slice(0, count)).size
}

function csvRefusal(err: CsvError): RuleRefused {
  const line = (err as CsvError & { lines?: number }).lines
  return new RuleRefused(
    `The file could not be read as CSV${line ? ` at line ${line}` : ''}: ${err.message.replace(/^[^:]*:\s*/, '')}. Nothing was imported.`,
    'csv_unreadable',
    { file: 'is not readable CSV' },
  )
}

/**
 * Reads a laboratory CSV as a stream, a chunk of rows at a time, so memory stays flat however
 * long the file is; the next chunk is parsed and checked while the previous one is matched and
 * stored (server and MariaDB at work together). A preview stores nothing; a commit stores every accepted row in one
 * transaction (or none, if anything fails), then derives, re-screens and audits.
 */
export async function importLabCsv(
  sequelize: Sequelize,
  viewer: Viewer,
  input: LabCsvInput,
  timeZone: string,
  maxRows: number = LIMITS.csvRows,
): Promise<ImportSummary> {
  const hash = createHash('sha256')
  const file = createReadStream(input.filePath)
  file.on('data', (c) => hash.update(c))
  // Records as arrays, the header and row numbers kept here: csv-parse's `info` and its objects
  // cost about half of its CPU (0.4-0.5 of 1.0-1.1 s for 100 000 rows, README performance notes).
  const parser = parse({
    delimiter: input.mapping.delimiter,
    bom: true,
    skip_empty_lines: true,
    relax_column_count: true,
    trim: true,
    max_record_size: 64 * 1024,
  })
  // pipeline, not pipe: a parse error destroys both streams and reaches the loop below.
  pipeline(file, parser, () => undefined)
  const run = new ImportRun(sequelize, viewer, {
    kind: 'lab-csv',
    commit: input.commit,
    sourceName: input.sourceName,
    fileName: input.fileName,
  })
  const now = Date.now()
  let chunk: { row: number; checked: Checked }[] = []
  let headerChecked = false
  let header: string[] | null = null
  let columns: Record<MappedField, number> | null = null
  let records = 0
  // The previous chunk's addChunk, in flight while this chunk is parsed and checked (server CPU
  // beside MariaDB's); at most one, so memory holds two chunks and the rows being read.
  let inFlight: Promise<unknown> = Promise.resolve()
  const send = async (rows: typeof chunk) => {
    await inFlight
    inFlight = run.addChunk(rows)
  }
  try {
    await run.begin()
    for await (const fields of parser as AsyncIterable<string[]>) {
      if (!header) {
        header = fields.map((x) => x.trim())
        continue
      }
      records += 1
      if (!headerChecked) {
        const heading = header
        const missing = MAPPED_FIELDS.filter((f) => !heading.includes(input.mapping.columns[f]))
        if (missing.length) {
          const names = missing.map((f) => `"${input.mapping.columns[f]}"`).join(', ')
          throw new RuleRefused(
            `The file has no column ${names} (its header reads: ${header.join(', ') || 'nothing'}). Check the column mapping ` +
              `for ${input.sourceName}.`,
            'missing_columns',
            { mapping: `columns ${names} are not in the file` },
          )
        }
        headerChecked = true
        columns = mappedColumnIndexes(header, input.mapping)
      }
      const row = records + 1
      if (records > maxRows) {
        throw new Invalid(
          `The file has more than ${maxRows} data rows, the limit for one upload; nothing was imported. Split it or export a ` +
            `shorter period.`,
          { file: `must have at most ${maxRows} rows` },
        )
      }
      // The fields are read by the mapped columns' positions (a repeated name keeps its last field, as
      // csv-parse's own objects did), not copied into an object per row.
      const checked: Checked =
        fields.length !== header.length
          ? {
              ok: false,
              code: 'bad-row',
              reason:
                `row has a different number of fields from the header (${distinctNames(header, fields.length)} of ` +
                `${header.length} read)`,
            }
          : checkCsvFields(fields, columns!, input.mapping, timeZone, now)
      chunk.push({ row, checked })
      // The parser hands over a whole read of the file (about 1400 rows) in microtasks, before any
      // socket callback can run: the chunk in flight would wait for it at each of its statements.
      if (records % YIELD_EVERY === 0) await yieldToIo()
      if (chunk.length >= CHUNK) {
        await send(chunk)
        chunk = []
      }
    }
    if (!headerChecked)
      throw new RuleRefused('The file is empty or has only a header; there is nothing to import', 'empty_file', { file: 'has no rows' })
    if (chunk.length) await send(chunk)
    await inFlight
    return await run.finish(hash.digest('hex'))
  } catch (caught) {
    // A chunk's failure is the error, as when each chunk was awaited before the next row was read:
    // a CSV error or the row limit met while it was in flight comes after it.
    const chunkErr: unknown = await inFlight.then(
      () => undefined,
      (e: unknown) => e,
    )
    const err = chunkErr ?? caught
    await run.abandon()
    file.destroy()
    throw err instanceof CsvError ? csvRefusal(err) : err
  }
}
