import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { ClinicalInputError, type Sex } from '../../../shared/clinical'
import { ANALYTE_DEFS, DERIVED_UNITS } from '../../../shared/pathway'
import type { ImportKind } from '../../../shared/imports'
import { AuditEntry } from '../../models/index'
import { egfrFromCreatinine, tsatFromSample, type SampleRow } from '../../../shared/clinic/derivations'
import { dateInZone } from '../../../shared/pathway'
import { clinicTimeZone } from '../clinicDay'
import { screenableSql } from '../../models/result'
import { refreshScreeningMany } from '../screening'
import type { Viewer } from '../viewer'
import type { MatchedRow } from './match'

const COLUMNS = '(referral_id, patient_id, analyte, value_canonical, unit_canonical, value_reported, unit_reported, taken_at, entered_by, ' +
    'source, derived_from, import_batch_id, created_at)'
const PLACEHOLDERS = '(?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)'

type ResultRow = [number, number, string, number, string, number | null, string | null, Date, number, string, string | null, number, Date]

/** One multi-row INSERT per chunk (not one ORM call per row); the natural key still guards it. */
export async function insertRows(sequelize: Sequelize, rows: ResultRow[], t: Transaction, chunk = 1000): Promise<void> {
  for (let i = 0; i < rows.length; i += chunk) {
    const part = rows.slice(i, i + chunk)
    await sequelize.query(`INSERT INTO results ${COLUMNS} VALUES ${part.map(() => PLACEHOLDERS).join(', ')}`, {
      type: QueryTypes.INSERT, replacements: part.flat(), transaction: t,
    })
  }
}

export function resultRows(rows: MatchedRow[], ctx: { batchId: number; kind: ImportKind; userId: number; now: Date }): ResultRow[] {
  return rows.map((m) => [
    m.referralId, m.patientId, m.reading.analyte, m.reading.valueCanonical, ANALYTE_DEFS[m.reading.analyte].canonicalUnit,
    m.reading.value, m.reading.unit, m.reading.takenAt, ctx.userId, ctx.kind, null, ctx.batchId, ctx.now,
  ])
}

/**
 * What typed-in results derive, for a whole batch: TSAT for each sample that now has iron and
 * transferrin/TIBC but no TSAT, and eGFR for each creatinine (results.ts holds the rules).
 * A sample whose iron exceeds its binding capacity gets no TSAT (counted as refused).
 */
export async function deriveForBatch(sequelize: Sequelize, batchId: number, userId: number, t: Transaction): Promise<{ derived: number; refused: number }> {
  const now = new Date()
  const out: ResultRow[] = []
  let refused = 0
  const creatinines = await sequelize.query<{ id: number; referralId: number; patientId: number; takenAt: Date; valueCanonical: number; dob: string | Date; sex: Sex }>(
    `SELECT r.id, r.referral_id AS referralId, r.patient_id AS patientId, r.taken_at AS takenAt, r.value_canonical AS
     valueCanonical, p.date_of_birth AS dob, p.sex
     FROM results r JOIN patients p ON p.id = r.patient_id WHERE r.import_batch_id = ? AND r.analyte = 'creatinine'`,
    { type: QueryTypes.SELECT, replacements: [batchId], transaction: t },
  )
  const egfrKeys = new Set<string>()
  for (const c of creatinines) {
    const dateOfBirth = c.dob instanceof Date ? c.dob.toISOString().slice(0, 10) : String(c.dob)
    const takenAt = new Date(c.takenAt)
    const egfr = egfrFromCreatinine(c.valueCanonical, dateInZone(takenAt, clinicTimeZone()), { dateOfBirth, sex: c.sex })
    const key = `${c.referralId}|${takenAt.getTime()}|${egfr}`
    if (egfr === null || egfrKeys.has(key)) continue
    egfrKeys.add(key)
    out.push([c.referralId, c.patientId, 'egfr', egfr, DERIVED_UNITS.egfr, null, null, takenAt, userId, 'derived', JSON.stringify([c.id]), batchId, now])
  }
  // Every iron-study row of each sample this batch touched, wherever it came from.
  const samples = await sequelize.query<SampleRow & { referralId: number; patientId: number; takenAt: Date }>(
    `SELECT r.id, r.referral_id AS referralId, r.patient_id AS patientId, r.analyte, r.value_canonical AS valueCanonical,
     r.taken_at AS takenAt
     FROM results r JOIN (SELECT DISTINCT referral_id, taken_at FROM results WHERE import_batch_id = ? AND analyte IN ('iron',
       'tibc', 'transferrin')) d
       ON d.referral_id = r.referral_id AND d.taken_at = r.taken_at
     WHERE r.analyte IN ('iron', 'tibc', 'transferrin', 'tsat') AND ${screenableSql('r')}`,
    { type: QueryTypes.SELECT, replacements: [batchId], transaction: t },
  )
  const bySample = new Map<string, typeof samples>()
  for (const s of samples) {
    const key = `${s.referralId}|${new Date(s.takenAt).getTime()}`
    bySample.set(key, [...(bySample.get(key) ?? []), s])
  }
  for (const rows of bySample.values()) {
    try {
      const tsat = tsatFromSample(rows)
      if (tsat) out.push([rows[0]!.referralId, rows[0]!.patientId, 'tsat', tsat.value, DERIVED_UNITS.tsat, null, null, new Date(rows[0]!.takenAt), userId, 'derived', JSON.stringify(tsat.derivedFrom), batchId, now])
    } catch (err) {
      if (!(err instanceof ClinicalInputError)) throw err
      refused += 1
    }
  }
  await insertRows(sequelize, out, t)
  return { derived: out.length, refused }
}

/**
 * Re-screens every episode the batch touched, as a typed-in result does, and writes one audit
 * row per episode (who imported what into which patient's record) in bulk.
 */
export async function rescreenAndAudit(
  sequelize: Sequelize, viewer: Viewer, perReferral: Map<number, { patientId: number; count: number }>, t: Transaction,
  audit: { action: string; batchId: number },
): Promise<void> {
  const ids = [...perReferral.keys()]
  await refreshScreeningMany(sequelize, ids, t)
  const entries = ids.map((id) => ({
    userId: viewer.userId, action: audit.action, entity: 'referral', entityId: String(id), patientId: perReferral.get(id)!.patientId,
    before: null, after: { importBatchId: audit.batchId, results: perReferral.get(id)!.count }, requestId: viewer.requestId, ip: viewer.ip,
  }))
  for (let i = 0; i < entries.length; i += 1000) await AuditEntry.bulkCreate(entries.slice(i, i + 1000), { transaction: t })
}
