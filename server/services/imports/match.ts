import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { naturalKey, type Checked, type Reading, type SkippedRow } from '../../../shared/imports'
import { ANALYTE_DEFS } from '../../../shared/pathway'
import type { Sex } from '../../../shared/clinical'

/** A row that will be stored: the reading and the episode it belongs to. */
export interface MatchedRow {
  row: number
  reading: Reading
  referralId: number
  patientId: number
  patientName: string
}

export interface PatientMatch {
  mrn: string
  patientId: number
  name: string
  dob: string
  sex: Sex
  referralId: number | null
}

// Stages after which an episode takes no new results; imports match only the open ones.
const ENDED = ['closed', 'withdrawn']

/** Patients by MRN with their newest open episode (one query for a chunk of rows). */
export async function findPatients(sequelize: Sequelize, mrns: string[], t?: Transaction): Promise<Map<string, PatientMatch>> {
  if (!mrns.length) return new Map()
  const rows = await sequelize.query<Omit<PatientMatch, 'dob'> & { dob: string | Date }>(
    `SELECT p.mrn, p.id AS patientId, CONCAT(p.given_name, ' ', p.family_name) AS name, p.date_of_birth AS dob, p.sex,
       (SELECT r.id FROM referrals r WHERE r.patient_id = p.id AND r.stage NOT IN (:ended) ORDER BY r.id DESC LIMIT 1) AS referralId
     FROM patients p WHERE p.mrn IN (:mrns)`,
    { type: QueryTypes.SELECT, replacements: { mrns, ended: ENDED }, transaction: t },
  )
  const out = new Map<string, PatientMatch>()
  for (const r of rows)
    out.set(r.mrn.toUpperCase(), { ...r, dob: r.dob instanceof Date ? r.dob.toISOString().slice(0, 10) : String(r.dob) })
  return out
}

/**
 * Which of these rows are already stored (inside the commit's transaction, earlier chunks count),
 * keyed by each row's own natural key. A value converted from another unit matches a stored one
 * within its tolerance (an exported µg/dL rounds the stored µmol/L), so a re-import is no new row.
 */
async function storedKeys(sequelize: Sequelize, rows: MatchedRow[], t?: Transaction): Promise<Map<string, number | null>> {
  if (!rows.length) return new Map()
  const where = rows.map(() => '(referral_id = ? AND analyte = ? AND taken_at = ? AND value_canonical BETWEEN ? AND ?)').join(' OR ')
  const found = await sequelize.query<{
    referralId: number
    analyte: string
    takenAt: Date
    valueCanonical: number
    batchId: number | null
  }>(
    `SELECT referral_id AS referralId, analyte, taken_at AS takenAt, value_canonical AS valueCanonical, import_batch_id AS ` +
      `batchId FROM results WHERE ${where}`,
    {
      type: QueryTypes.SELECT,
      transaction: t,
      replacements: rows.flatMap((r) => {
        const tol = r.reading.tolerance ?? 0
        return [r.referralId, r.reading.analyte, r.reading.takenAt, r.reading.valueCanonical - tol, r.reading.valueCanonical + tol]
      }),
    },
  )
  const sample = (referralId: number, analyte: string, takenAt: Date) =>
    `${referralId}|${analyte}|${Math.floor(new Date(takenAt).getTime() / 1000)}`
  const bySample = new Map<string, typeof found>()
  for (const f of found)
    bySample.set(sample(f.referralId, f.analyte, f.takenAt), [...(bySample.get(sample(f.referralId, f.analyte, f.takenAt)) ?? []), f])
  const out = new Map<string, number | null>()
  for (const r of rows) {
    const tol = r.reading.tolerance ?? 0
    const hit = bySample
      .get(sample(r.referralId, r.reading.analyte, r.reading.takenAt))
      ?.find((f) => Math.abs(f.valueCanonical - r.reading.valueCanonical) <= tol)
    if (hit) out.set(naturalKey(r.referralId, r.reading.analyte, r.reading.takenAt, r.reading.valueCanonical), hit.batchId)
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
 */
export async function matchChunk(
  sequelize: Sequelize,
  items: { row: number; checked: Checked }[],
  run: { batchId: number | null; seen: Set<string> },
  t?: Transaction,
): Promise<ChunkOutcome> {
  const skipped: SkippedRow[] = []
  const valid: { row: number; reading: Reading }[] = []
  for (const it of items) {
    if (it.checked.ok) valid.push({ row: it.row, reading: it.checked.reading })
    else skipped.push({ row: it.row, code: it.checked.code, reason: it.checked.reason })
  }
  const patients = await findPatients(sequelize, [...new Set(valid.map((v) => v.reading.mrn))], t)
  const matched: MatchedRow[] = []
  for (const v of valid) {
    const p = patients.get(v.reading.mrn.toUpperCase())
    if (!p) skipped.push({ row: v.row, code: 'unknown-mrn', reason: `no patient has MRN ${v.reading.mrn}` })
    else if (p.referralId == null)
      skipped.push({
        row: v.row,
        code: 'no-open-referral',
        reason: `patient ${v.reading.mrn} has no open episode (closed or withdrawn ones take no results)`,
      })
    else if (v.reading.takenAt.toISOString().slice(0, 10) < p.dob)
      skipped.push({ row: v.row, code: 'bad-date', reason: 'time taken is before the date of birth' })
    else matched.push({ row: v.row, reading: v.reading, referralId: p.referralId, patientId: p.patientId, patientName: p.name })
  }
  const stored = await storedKeys(sequelize, matched, t)
  const accepted: MatchedRow[] = []
  for (const m of matched) {
    const key = naturalKey(m.referralId, m.reading.analyte, m.reading.takenAt, m.reading.valueCanonical)
    const label = `${ANALYTE_DEFS[m.reading.analyte].label} ${m.reading.value} ${m.reading.unit} taken ${m.reading.takenAt.toISOString()}`
    const inTable = stored.has(key)
    if (inTable && (run.batchId === null || stored.get(key) !== run.batchId))
      skipped.push({ row: m.row, code: 'duplicate-stored', reason: `${label} is already stored for ${m.reading.mrn}` })
    else if (inTable || run.seen.has(key))
      skipped.push({ row: m.row, code: 'duplicate-in-file', reason: `${label} appears earlier in this file` })
    else {
      run.seen.add(key)
      accepted.push(m)
    }
  }
  skipped.sort((a, b) => a.row - b.row)
  return { accepted, skipped }
}
