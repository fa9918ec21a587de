import type { Sequelize, Transaction } from 'sequelize'
import { naturalKey, type Checked, type Reading, type SkippedRow } from '../../../shared/imports'
import { ANALYTE_DEFS } from '../../../shared/pathway'
import { PREVIEW_KEYS } from './previewKeys'
import type { KnownPatients } from './knownPatients'
import { rawInTransaction } from '../rawTransaction'
import { utcParam } from '../rawRead'
import type { Sex } from '../../../shared/clinical'

/** A row that will be stored: the reading and the episode it belongs to. */
export interface MatchedRow {
  row: number
  reading: Reading
  referralId: number
  patientId: number
  patientName: string
  /**
   * The time taken as the UTC text the statements send (rawRead.ts's utcParam), worked out once per
   * row rather than again by each statement that names it (the duplicate look-up, the insert).
   */
  takenAtUtc: string
}

export interface PatientMatch {
  mrn: string
  patientId: number
  name: string
  dob: string
  sex: Sex
  referralId: number | null
  /**
   * The UTC start of the date of birth: a time taken before it has a UTC date before the date of
   * birth, the rule as before, without formatting every row's time to compare text.
   */
  bornAtMs?: number
}

// Stages after which an episode takes no new results; imports match only the open ones.
const ENDED = ['closed', 'withdrawn']

/**
 * Patients by MRN with their newest open episode (one query for a chunk of rows). MAX(id), not
 * ORDER BY id DESC LIMIT 1: the same episode at about half MariaDB's CPU for 1000 MRNs (6 against
 * 10 ms); a join of the chunk's MRNs as a VALUES table to a grouped MAX was no cheaper (README).
 */
export async function findPatients(sequelize: Sequelize, mrns: string[], t?: Transaction): Promise<Map<string, PatientMatch>> {
  if (!mrns.length) return new Map()
  // Through the driver on the run's connection (rawTransaction.ts), the date of birth as text:
  // Sequelize's query path and its DATE type cast were a third of this statement's server CPU.
  const rows = await rawInTransaction<PatientMatch[]>(
    sequelize,
    t,
    `SELECT p.mrn, p.id AS patientId, CONCAT(p.given_name, ' ', p.family_name) AS name,
       DATE_FORMAT(p.date_of_birth, '%Y-%m-%d') AS dob, p.sex,
       (SELECT MAX(r.id) FROM referrals r WHERE r.patient_id = p.id AND r.stage NOT IN (${ENDED.map(() => '?').join(', ')})) AS referralId
     FROM patients p WHERE p.mrn IN (${mrns.map(() => '?').join(', ')})`,
    [...ENDED, ...mrns],
    { plainRows: true },
  )
  const out = new Map<string, PatientMatch>()
  // The driver's own row objects, completed in place rather than copied (a chunk reads up to a thousand).
  for (const r of rows) {
    r.bornAtMs = Date.parse(`${r.dob}T00:00:00Z`)
    out.set(r.mrn.toUpperCase(), r)
  }
  return out
}

/**
 * Which of these rows are already stored (inside the run's transaction, earlier chunks count:
 * a commit's inserted rows, a preview's key table),
 * keyed by each row's own natural key. A value converted from another unit matches a stored one
 * within its tolerance (an exported µg/dL rounds the stored µmol/L), so a re-import is no new row.
 *
 * One statement per chunk: the chunk's keys as a table of VALUES, joined to results through the
 * natural-key index (STRAIGHT_JOIN keeps the keys the driving side, so each is one index probe).
 * An OR of a thousand key ranges here cost MariaDB's range optimiser about a third of a second
 * per chunk, most of an import's time (README, performance notes).
 */
async function storedKeys(
  sequelize: Sequelize,
  rows: MatchedRow[],
  run: { batchId: number | null; previewKeys?: boolean },
  t?: Transaction,
): Promise<Map<string, number | null>> {
  if (!rows.length) return new Map()
  // A preview keeps the rows it accepted in its own key table (previewKeys.ts), as this batch's.
  const earlierInFile = run.previewKeys
    ? `UNION ALL SELECT STRAIGHT_JOIN k.i, p.value_canonical, ${Number(run.batchId)}
     FROM k JOIN ${PREVIEW_KEYS} p ON p.referral_id = k.referral_id AND p.analyte = k.analyte AND p.taken_at = k.taken_at
       AND p.value_canonical BETWEEN k.lo AND k.hi`
    : ''
  const found = await rawInTransaction<{ i: number; valueCanonical: number; batchId: number | null }[]>(
    sequelize,
    t,
    `WITH k (i, referral_id, analyte, taken_at, lo, hi) AS (VALUES ${rows.map(() => '(?, ?, ?, ?, ?, ?)').join(', ')})
     SELECT STRAIGHT_JOIN k.i, r.value_canonical AS valueCanonical, r.import_batch_id AS batchId
     FROM k JOIN results r ON r.referral_id = k.referral_id AND r.analyte = k.analyte AND r.taken_at = k.taken_at
       AND r.value_canonical BETWEEN k.lo AND k.hi ${earlierInFile}`,
    keyParams(rows),
    { plainRows: true },
  )
  // Lowest matching value first, whichever table holds it: one order for a preview and its commit.
  found.sort((a, b) => Number(a.i) - Number(b.i) || a.valueCanonical - b.valueCanonical)
  const out = new Map<string, number | null>()
  for (const f of found) {
    const r = rows[Number(f.i)]!
    const key = naturalKey(r.referralId, r.reading.analyte, r.reading.takenAt, r.reading.valueCanonical)
    // The first stored row within tolerance answers, as before.
    if (!out.has(key) && Math.abs(f.valueCanonical - r.reading.valueCanonical) <= (r.reading.tolerance ?? 0)) out.set(key, f.batchId)
  }
  return out
}

/** The duplicate look-up's six values a row, in one flat array (no small array per row to flatten). */
function keyParams(rows: readonly MatchedRow[]): (string | number)[] {
  const out: (string | number)[] = []
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i]!
    const tol = r.reading.tolerance ?? 0
    out.push(i, r.referralId, r.reading.analyte, r.takenAtUtc, r.reading.valueCanonical - tol, r.reading.valueCanonical + tol)
  }
  return out
}

export interface ChunkOutcome {
  accepted: MatchedRow[]
  skipped: SkippedRow[]
}

/**
 * Matches one chunk of checked rows to patients and episodes and removes duplicates, both of
 * stored results (earlier chunks of this file are already in the run's transaction) and of
 * rows met earlier in this chunk (`run.seen`); a stored row of this very batch is a repeat in the file.
 * `run.before`: the run's previous write, awaited before the duplicate look-up. `run.patients`:
 * the run's patient-match answers so far, each MRN asked once per run.
 */
export async function matchChunk(
  sequelize: Sequelize,
  items: { row: number; checked: Checked }[],
  run: { batchId: number | null; seen: Set<string>; previewKeys?: boolean; before?: Promise<unknown>; patients?: KnownPatients },
  t?: Transaction,
): Promise<ChunkOutcome> {
  const skipped: SkippedRow[] = []
  const valid: { row: number; reading: Reading }[] = []
  for (const it of items) {
    if (it.checked.ok) valid.push({ row: it.row, reading: it.checked.reading })
    else skipped.push({ row: it.row, code: it.checked.code, reason: it.checked.reason })
  }
  // The patient match reads no results, so it is sent before the previous chunk's write has
  // answered (`run.before`); the duplicate look-up reads that write, so it waits for it, and if
  // the write failed its error is thrown here and nothing more is sent. Only MRNs the run has not
  // asked about yet are sent (`run.patients`, knownPatients.ts).
  const mrns = new Set(valid.map((v) => v.reading.mrn))
  const asked = run.patients ? run.patients.unknown(mrns) : [...mrns]
  const [found] = await Promise.all([findPatients(sequelize, asked, t), run.before])
  const matched: MatchedRow[] = []
  for (const v of valid) {
    const known = run.patients?.get(v.reading.mrn)
    const p = known !== undefined ? known : found.get(v.reading.mrn.toUpperCase())
    if (!p) skipped.push({ row: v.row, code: 'unknown-mrn', reason: `no patient has MRN ${v.reading.mrn}` })
    else if (p.referralId == null)
      skipped.push({
        row: v.row,
        code: 'no-open-referral',
        reason: `patient ${v.reading.mrn} has no open episode (closed or withdrawn ones take no results)`,
      })
    else if (v.reading.takenAt.getTime() < p.bornAtMs!)
      skipped.push({ row: v.row, code: 'bad-date', reason: 'time taken is before the date of birth' })
    else
      matched.push({
        row: v.row,
        reading: v.reading,
        referralId: p.referralId,
        patientId: p.patientId,
        patientName: p.name,
        takenAtUtc: utcParam(v.reading.takenAt) as string,
      })
  }
  run.patients?.remember(asked, found)
  const stored = await storedKeys(sequelize, matched, run, t)
  const accepted: MatchedRow[] = []
  for (const m of matched) {
    const key = naturalKey(m.referralId, m.reading.analyte, m.reading.takenAt, m.reading.valueCanonical)
    // Built only for a skipped row: an accepted one needs no words.
    const label = () =>
      `${ANALYTE_DEFS[m.reading.analyte].label} ${m.reading.value} ${m.reading.unit} taken ${m.reading.takenAt.toISOString()}`
    const inTable = stored.has(key)
    if (inTable && (run.batchId === null || stored.get(key) !== run.batchId))
      skipped.push({ row: m.row, code: 'duplicate-stored', reason: `${label()} is already stored for ${m.reading.mrn}` })
    else if (inTable || run.seen.has(key))
      skipped.push({ row: m.row, code: 'duplicate-in-file', reason: `${label()} appears earlier in this file` })
    else {
      run.seen.add(key)
      accepted.push(m)
    }
  }
  skipped.sort((a, b) => a.row - b.row)
  return { accepted, skipped }
}
