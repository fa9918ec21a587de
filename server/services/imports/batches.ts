import { QueryTypes, type Sequelize } from 'sequelize'
import { ImportBatch, User } from '../../models/index'
import { recordAudit } from '../audit'
import { rescreenAndAudit } from '../resultStore'
import { isoOrNull, type Viewer } from '../viewer'
import { NotFound, RuleRefused } from '../../errors'
import type { BatchView } from '../../../shared/imports'
import { READ_ONLY_STAGES } from '../../../shared/pathway/stages'

type Row = ImportBatch & { creator?: User | null; reverser?: User | null }
const who = (u?: User | null) => (u ? { id: u.id, name: u.name } : null)

function toView(b: Row): BatchView {
  return {
    id: b.id,
    kind: b.kind,
    sourceName: b.sourceName,
    fileName: b.fileName,
    sha256: b.sha256,
    createdAt: isoOrNull(b.createdAt)!,
    createdBy: who(b.creator),
    rowsRead: b.rowsRead,
    accepted: b.accepted,
    skipped: b.skipped,
    derived: b.derived,
    referralsAffected: b.referralsAffected,
    skipCounts: b.skipCounts ?? {},
    reversedAt: isoOrNull(b.reversedAt),
    reversedBy: who(b.reverser),
    reversalReason: b.reversalReason,
    resultsRemoved: b.resultsRemoved,
  }
}

const include = [
  { model: User, as: 'creator', attributes: ['id', 'name'] },
  { model: User, as: 'reverser', attributes: ['id', 'name'] },
]

export async function listBatches(limit = 100): Promise<BatchView[]> {
  const rows = await ImportBatch.findAll({ include, order: [['id', 'DESC']], limit })
  return rows.map((r) => toView(r as Row))
}

export async function getBatch(id: number): Promise<BatchView> {
  const row = await ImportBatch.findByPk(id, { include })
  if (!row) throw new NotFound('Import batch')
  return toView(row as Row)
}

/**
 * Takes a batch back out: its results (and what was derived from them in the batch) are
 * deleted and every episode it touched is re-screened, in one transaction with the audit.
 * The batch row stays, marked reversed, so the record says what happened and why.
 */
export async function reverseBatch(sequelize: Sequelize, viewer: Viewer, id: number, reason: string): Promise<BatchView> {
  await sequelize.transaction(async (t) => {
    const batch = await ImportBatch.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
    if (!batch) throw new NotFound('Import batch')
    if (batch.reversedAt) throw new RuleRefused(`Import batch ${id} was already reversed`, 'already_reversed')
    const affected = await sequelize.query<{ referralId: number; patientId: number; n: number }>(
      'SELECT referral_id AS referralId, patient_id AS patientId, COUNT(*) AS n FROM results WHERE import_batch_id = ? GROUP BY ' +
        'referral_id, patient_id',
      { type: QueryTypes.SELECT, replacements: [id], transaction: t },
    )
    // A closed episode is read-only (shared/pathway/stages.ts): its results are part of a record
    // that has been signed off, so a batch that reached one cannot be taken back out.
    const closed = await sequelize.query<{ id: number }>(
      `SELECT id FROM referrals WHERE stage IN (${READ_ONLY_STAGES.map(() => '?').join(', ')}) AND id IN (SELECT referral_id ` +
        `FROM results WHERE import_batch_id = ?)`,
      { type: QueryTypes.SELECT, replacements: [...READ_ONLY_STAGES, id], transaction: t },
    )
    if (closed.length) {
      throw new RuleRefused(
        `Import batch ${id} added results to ${closed.length} closed episode${closed.length === 1 ? '' : 's'} ` +
          `(${closed.map((c) => c.id).join(', ')}); a closed episode is read-only, so the batch cannot be reversed.`,
        'episode_closed',
      )
    }
    await sequelize.query('DELETE FROM results WHERE import_batch_id = ?', { type: QueryTypes.DELETE, replacements: [id], transaction: t })
    const removedCount = affected.reduce((n, a) => n + Number(a.n), 0)
    await ImportBatch.update(
      { reversedAt: new Date(), reversedBy: viewer.userId, reversalReason: reason, resultsRemoved: removedCount },
      { where: { id }, transaction: t },
    )
    await recordAudit(t, viewer, {
      action: 'reverse',
      entity: 'import_batch',
      entityId: id,
      before: { accepted: batch.accepted },
      after: { reason, resultsRemoved: removedCount, referrals: affected.length },
    })
    // Every episode the batch reached: re-screened, its pre-aggregates refreshed and one audit row each, written a
    // thousand per INSERT (resultStore.ts).
    const perReferral = new Map(affected.map((a) => [a.referralId, { patientId: a.patientId, count: Number(a.n) }]))
    const audit = { action: 'reverse-import', after: (resultsRemoved: number) => ({ importBatchId: id, resultsRemoved, reason }) }
    await rescreenAndAudit(sequelize, viewer, perReferral, t, audit)
  })
  return getBatch(id)
}
