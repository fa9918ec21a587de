import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { ClinicalInputError, type Sex } from '../../shared/clinical'
import { egfrFromCreatinine, tsatFromSample, type SampleRow } from '../../shared/clinic/derivations'
import { ANALYTE_DEFS, DERIVED_UNITS, dateInZone, type StoredAnalyte } from '../../shared/pathway'
import { Patient, Result } from '../models/index'
import { SCREENABLE_WHERE, screenableSql, type ResultSource, type ResultStatus } from '../models/result'
import { clinicTimeZone } from './clinicDay'
import { refreshScreeningMany } from './screening'
import { clinical, type Viewer } from './viewer'
import { rawBatchInTransaction, rawInTransaction, type RawValue } from './rawTransaction'
import { utcText } from './utcText'
import { refreshEpisodeFacts } from './reports/episodeFacts'
import { refreshHbMilestones } from './reports/referralMilestones'
import { utcParam } from './rawRead'
import { setImmediate as yieldToIo } from 'node:timers/promises'
import { SerialWrites } from './serialWrites'

/**
 * The one place results are written: typed-in (services/results.ts), CSV and FHIR imports
 * (services/imports/run.ts) and HL7 (services/hl7/oruStore.ts) store rows, derive TSAT and eGFR
 * and re-screen their episodes through these functions. The rules themselves are pure, in
 * shared/clinic (derivations.ts, screening.ts); this module only reads and writes around them,
 * in bulk where a path brings many rows.
 */

/** A result to store, as every entry path gives it (canonical value; what was reported beside it). */
export interface NewResult {
  referralId: number
  patientId: number
  analyte: StoredAnalyte
  valueCanonical: number
  valueReported: number | null
  unitReported: string | null
  takenAt: Date
  /** takenAt as the UTC text insertResults sends, when the caller has it already (an import's matched rows). */
  takenAtUtc?: string
  enteredBy: number | null
  source: ResultSource
  derivedFrom?: number[] | null
  importBatchId?: number | null
  status?: ResultStatus
  /** A laboratory feed's extras (HL7 OBX): '<' etc., the message, the range and flags as sent. */
  comparator?: string | null
  hl7MessageId?: number | null
  referenceRange?: string | null
  abnormalFlags?: string | null
}

const COLUMNS = `(referral_id, patient_id, analyte, value_canonical, unit_canonical, value_reported, unit_reported,
  taken_at, entered_by, source,
  derived_from, import_batch_id, status, comparator, hl7_message_id, reference_range, abnormal_flags, created_at)`
const PLACEHOLDERS = `(${new Array(18).fill('?').join(', ')})`
const unitOf = (analyte: StoredAnalyte) =>
  analyte === 'tsat' || analyte === 'egfr' ? DERIVED_UNITS[analyte] : ANALYTE_DEFS[analyte].canonicalUnit

/**
 * One bulk INSERT for all the rows (not one ORM call per row). The natural key (referral, analyte,
 * time taken, value) is a unique index, so a row stored twice fails the whole call rather than
 * slipping in: callers find duplicates first (by the natural key, in bulk for imports) and refuse or skip them.
 */
export async function insertResults(sequelize: Sequelize, rows: readonly NewResult[], t: Transaction): Promise<void> {
  // The driver's bulk protocol: prepared once, rows sent as binary values (rawTransaction.ts).
  // The creation time as UTC text once, not formatted again for every row.
  const now = utcParam(new Date())
  await rawBatchInTransaction(
    sequelize,
    t,
    `INSERT INTO results ${COLUMNS} VALUES ${PLACEHOLDERS}`,
    rows.map((r) => bulkRowValues(r, now)),
  )
}

/**
 * rowValues for the bulk protocol, the two measured values as decimal text. The driver types each
 * number as INT or DOUBLE by its value and starts a new bulk command whenever a column's type
 * changes from one row to the next (a NULL is typed as text, too), so a batch whose values are
 * sometimes whole (eGFR 61 after 60.8, an Hb of 120 after a ferritin of 8.5) went as thousands of
 * commands: 2 700 for the bench's 15 775 derived eGFR rows. MariaDB reads the text into the DOUBLE
 * column as it reads a number in the text protocol (correctly rounded; JavaScript's shortest
 * round-trip form), so the stored double is the same (hazard H-126; README, performance notes: hashed against main).
 */
function bulkRowValues(r: NewResult, now: Date | string): RawValue[] {
  const v = rowValues(r, now, r.takenAtUtc ?? utcParam(r.takenAt))
  v[VALUE_CANONICAL] = asText(r.valueCanonical)
  v[VALUE_REPORTED] = asText(r.valueReported)
  return v
}
const asText = (n: number | null) => (n == null ? null : String(n))

/**
 * insertResults for a few rows whose ids the caller needs (an HL7 batch: the message log names
 * them): one INSERT ... RETURNING (MariaDB 10.5+), ids in the rows' order, never assumed consecutive.
 */
export async function insertResultsReturningIds(sequelize: Sequelize, rows: readonly NewResult[], t: Transaction): Promise<number[]> {
  if (!rows.length) return []
  const now = new Date()
  const out = await sequelize.query<{ id: number }>(
    `INSERT INTO results ${COLUMNS} VALUES ${rows.map(() => PLACEHOLDERS).join(', ')} RETURNING id`,
    { type: QueryTypes.SELECT, replacements: rows.flatMap((r) => rowValues(r, now)), transaction: t },
  )
  if (out.length !== rows.length) throw new Error(`INSERT ... RETURNING gave ${out.length} ids for ${rows.length} results`)
  return out.map((r) => r.id)
}

const VALUE_CANONICAL = 3
const VALUE_REPORTED = 5

function rowValues(r: NewResult, now: Date | string, takenAt: Date | string = r.takenAt): RawValue[] {
  return [
    r.referralId,
    r.patientId,
    r.analyte,
    r.valueCanonical,
    unitOf(r.analyte),
    r.valueReported,
    r.unitReported,
    takenAt,
    r.enteredBy,
    r.source,
    r.derivedFrom ? JSON.stringify(r.derivedFrom) : null,
    r.importBatchId ?? null,
    r.status ?? 'final',
    r.comparator ?? null,
    r.hl7MessageId ?? null,
    r.referenceRange ?? null,
    r.abnormalFlags ?? null,
    now,
  ]
}

/** One result whose row the caller needs back (typed-in, HL7): the same columns as insertResults. */
export function storeResult(r: NewResult, t: Transaction): Promise<Result> {
  return Result.create({ ...r, unitCanonical: unitOf(r.analyte), derivedFrom: r.derivedFrom ?? null }, { transaction: t })
}

/** TSAT for one sample of a typed-in or HL7 result, unless the laboratory reported one (shared/clinic/derivations.ts). */
export async function deriveTsat(
  base: { referralId: number; patientId: number; takenAt: Date; enteredBy: number | null },
  t: Transaction,
): Promise<Result | null> {
  const rows = await Result.findAll({
    where: {
      referralId: base.referralId,
      takenAt: base.takenAt,
      analyte: { [Op.in]: ['iron', 'tibc', 'transferrin', 'tsat'] },
      ...SCREENABLE_WHERE,
    },
    attributes: ['id', 'analyte', 'valueCanonical'],
    raw: true,
    transaction: t,
  })
  const tsat = clinical('value', () => tsatFromSample(rows))
  if (!tsat) return null
  return storeResult(
    {
      ...base,
      analyte: 'tsat',
      valueCanonical: tsat.value,
      valueReported: null,
      unitReported: null,
      source: 'derived',
      derivedFrom: tsat.derivedFrom,
    },
    t,
  )
}

/** eGFR from one creatinine (CKD-EPI 2021 in shared/clinic/derivations.ts); one derived row per sample and value. */
export async function deriveEgfr(
  creatinine: Result,
  patient: Pick<Patient, 'dateOfBirth' | 'sex'>,
  t: Transaction,
): Promise<Result | null> {
  const egfr = clinical('value', () =>
    egfrFromCreatinine(creatinine.valueCanonical, dateInZone(creatinine.takenAt, clinicTimeZone()), patient),
  )
  if (egfr === null) return null
  const same = { referralId: creatinine.referralId, analyte: 'egfr' as const, takenAt: creatinine.takenAt, valueCanonical: egfr }
  // Two creatinines of one sample can round to the same eGFR; one derived row says it.
  if (await Result.findOne({ where: { ...same, voidedAt: null }, transaction: t })) return null
  return storeResult(
    {
      ...same,
      patientId: creatinine.patientId,
      valueReported: null,
      unitReported: null,
      enteredBy: creatinine.enteredBy,
      source: 'derived',
      derivedFrom: [creatinine.id],
    },
    t,
  )
}

/**
 * What typed-in results derive, for a whole import batch: TSAT for each sample that now has iron
 * and transferrin/TIBC but no TSAT, and eGFR for each creatinine. A sample whose iron exceeds its
 * binding capacity gets no TSAT (counted as refused), where a typed-in one is refused with a 422.
 */
export async function deriveForBatch(
  sequelize: Sequelize,
  batchId: number,
  userId: number,
  t: Transaction,
  writes?: SerialWrites,
): Promise<{ derived: number; refused: number }> {
  const out: NewResult[] = []
  let refused = 0
  const derived = (analyte: 'egfr' | 'tsat', from: DerivedFrom, takenAt: Date, value: number, derivedFrom: number[]) =>
    derivedResult(from, takenAt, analyte, value, derivedFrom, userId, batchId)
  // Through the driver (rawTransaction.ts) on the transaction's connection, its own row objects
  // (plainRows: every column is a number or text, the times and the date of birth formatted by
  // MariaDB), without Sequelize's query path and type cast for a 20 000-row read.
  const creatinines = await rawInTransaction<CreatinineRow[]>(
    sequelize,
    t,
    `SELECT r.id, r.referral_id AS referralId, r.patient_id AS patientId, ${utcText('r.taken_at')} AS takenAt,
      r.value_canonical AS valueCanonical, DATE_FORMAT(p.date_of_birth, '%Y-%m-%d') AS dob, p.sex
     FROM results r JOIN patients p ON p.id = r.patient_id WHERE r.import_batch_id = ? AND r.analyte = 'creatinine'`,
    [batchId],
    { plainRows: true },
  )
  const egfrKeys = new Set<string>()
  const zone = clinicTimeZone()
  for (let i = 0; i < creatinines.length; i++) {
    // The event loop runs between slices, so that writes queued beside this (rescreenAndAudit) keep going.
    if (i > 0 && i % 250 === 0) await yieldToIo()
    const c = creatinines[i]!
    const takenAt = new Date(c.takenAt)
    const egfr = egfrFromCreatinine(c.valueCanonical, dateInZone(takenAt, zone), { dateOfBirth: c.dob, sex: c.sex })
    if (egfr === null) continue
    // One text per instant (utcText), so the stored time's text keys the sample as its Date did.
    const key = `${c.referralId}|${c.takenAt}|${egfr}`
    if (egfrKeys.has(key)) continue
    egfrKeys.add(key)
    out.push(derived('egfr', c, takenAt, egfr, [c.id]))
  }
  // Every iron-study row of each sample this batch touched, wherever it came from.
  const samples = await rawInTransaction<(SampleRow & { referralId: number; patientId: number; takenAt: string })[]>(
    sequelize,
    t,
    `SELECT r.id, r.referral_id AS referralId, r.patient_id AS patientId, r.analyte, r.value_canonical AS valueCanonical,
      ${utcText('r.taken_at')} AS takenAt
     FROM results r JOIN (SELECT DISTINCT referral_id,
       taken_at FROM results WHERE import_batch_id = ? AND analyte IN ('iron', 'tibc', 'transferrin')) d
       ON d.referral_id = r.referral_id AND d.taken_at = r.taken_at
     WHERE r.analyte IN ('iron', 'tibc', 'transferrin', 'tsat') AND ${screenableSql('r')}`,
    [batchId],
    { plainRows: true },
  )
  const bySample = new Map<string, typeof samples>()
  for (const s of samples) {
    const key = `${s.referralId}|${s.takenAt}`
    const rows = bySample.get(key)
    if (rows) rows.push(s)
    else bySample.set(key, [s])
  }
  for (const rows of bySample.values()) {
    try {
      const tsat = tsatFromSample(rows)
      if (tsat) out.push(derived('tsat', rows[0]!, new Date(rows[0]!.takenAt), tsat.value, tsat.derivedFrom))
    } catch (err) {
      if (!(err instanceof ClinicalInputError)) throw err
      refused += 1
    }
  }
  await (writes ? writes.now(() => insertResults(sequelize, out, t)) : insertResults(sequelize, out, t))
  return { derived: out.length, refused }
}

/** The row a derived value comes from; takenAt as utcText reads it ('2026-01-05T09:00:00Z'). */
type DerivedFrom = { referralId: number; patientId: number; takenAt: string }

interface CreatinineRow {
  id: number
  referralId: number
  patientId: number
  /** utcText: '2026-01-05T09:00:00Z' */
  takenAt: string
  valueCanonical: number
  dob: string
  sex: Sex
}

/**
 * A row an import derives, every field written out (one object shape, no spread per row). Its time goes
 * to insertResults as the UTC text it sends ('2026-01-05 09:00:00.000', as utcParam writes a Date),
 * cut from the utcText read rather than formatted again from a Date.
 */
function derivedResult(
  from: DerivedFrom,
  takenAt: Date,
  analyte: 'egfr' | 'tsat',
  valueCanonical: number,
  derivedFrom: number[],
  userId: number,
  batchId: number,
): NewResult {
  const iso = from.takenAt
  return {
    referralId: from.referralId,
    patientId: from.patientId,
    analyte,
    valueCanonical,
    valueReported: null,
    unitReported: null,
    takenAt,
    takenAtUtc: `${iso.slice(0, 10)} ${iso.slice(11, 19)}.000`,
    enteredBy: userId,
    source: 'derived',
    derivedFrom,
    importBatchId: batchId,
  }
}

/**
 * The per-episode work after a bulk write of results (an import's commit, its reversal), once per episode
 * (not once per row), in the caller's transaction: `derive` (an import's TSAT and eGFR), the re-screening a
 * typed-in result also gets, the two per-referral pre-aggregates' refreshes, and one audit row per episode
 * (who put what into, or took it out of, which patient's record).
 *
 * All of it shares the transaction's one connection through SerialWrites: the refreshes and the audit rows,
 * which nothing here reads, are queued first and sent whenever no other write is waited for, so MariaDB runs
 * them while the server derives and applies the screening rules, instead of after (issue #19). They read only
 * Hb rows and the episodes' other tables, which derivation (TSAT, eGFR) and re-screening (the referral's
 * screening columns) do not write. refreshScreeningMany says worklistChanged('referral', t).
 */
export async function rescreenAndAudit(
  sequelize: Sequelize,
  viewer: Viewer,
  perReferral: Map<number, { patientId: number; count: number }>,
  t: Transaction,
  audit: { action: string; after: (count: number) => object },
  derive?: (writes: SerialWrites) => Promise<void>,
): Promise<void> {
  const ids = [...perReferral.keys()]
  const writes = new SerialWrites()
  const at = new Date()
  for (let i = 0; i < ids.length; i += PER_STATEMENT) {
    const part = ids.slice(i, i + PER_STATEMENT)
    writes.whenIdle(() => refreshEpisodeFacts(t, part))
    writes.whenIdle(() => refreshHbMilestones(t, part))
    const rows = part.map((id) => {
      const { patientId, count } = perReferral.get(id)!
      return { referralId: id, patientId, after: audit.after(count) }
    })
    writes.whenIdle(() => insertEpisodeAudit(sequelize, viewer, rows, audit.action, t, at))
  }
  // Whatever fails first is thrown by drained(), and nothing is written after it.
  const work = (async () => {
    if (derive) await derive(writes)
    await refreshScreeningMany(sequelize, ids, t, writes)
  })()
  const settled = await Promise.allSettled([work, writes.drained()])
  for (const s of settled) if (s.status === 'rejected') throw s.reason
}

/** Episodes per refresh statement and per audit INSERT: a small, fixed-size statement for a write of any size. */
const PER_STATEMENT = 1000

/**
 * One audit row per episode a bulk write touched, as recordAudit writes them (same columns, the
 * caller's transaction), a thousand per INSERT: the ORM's bulkCreate built a model per row, which
 * cost more than the rows' own insert for a 20 000-episode import or reversal. The table stays
 * append-only by its database triggers.
 */
export async function insertEpisodeAudit(
  sequelize: Sequelize,
  viewer: Viewer,
  rows: readonly { referralId: number; patientId: number; after: object }[],
  action: string,
  t: Transaction,
  at = new Date(),
): Promise<void> {
  // The bulk protocol (rawBatchInTransaction), a thousand rows a call: one prepared statement
  // instead of MariaDB parsing 8 000 literals per INSERT. Every row has the same value types.
  for (let i = 0; i < rows.length; i += 1000) {
    await rawBatchInTransaction(
      sequelize,
      t,
      `INSERT INTO audit_entries (at, user_id, action, entity, entity_id, patient_id, \`before\`, \`after\`, request_id, ip)
       VALUES (?, ?, ?, 'referral', ?, ?, NULL, ?, ?, ?)`,
      rows
        .slice(i, i + 1000)
        .map((r) => [at, viewer.userId, action, String(r.referralId), r.patientId, JSON.stringify(r.after), viewer.requestId, viewer.ip]),
    )
  }
}
