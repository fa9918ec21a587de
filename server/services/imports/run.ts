import { Op, Transaction, type Sequelize } from 'sequelize'
import { LIST_CAP, type Checked, type ImportKind, type ImportSummary } from '../../../shared/imports'
import { ANALYTE_DEFS } from '../../../shared/pathway'
import { ImportBatch } from '../../models/importBatch'
import { recordAudit } from '../audit'
import { isoOrNull, type Viewer } from '../viewer'
import { matchChunk, type ChunkOutcome } from './match'
import { KnownPatients } from './knownPatients'
import { deriveForBatch, insertResults, rescreenAndAudit } from '../resultStore'
import { addPreviewKeys, createPreviewKeys, dropPreviewKeys } from './previewKeys'

/**
 * One import, preview or commit, fed chunk by chunk. Both hold one transaction from the first
 * chunk to the last. A commit inserts rows as they come, so duplicates against earlier chunks are
 * found by the table's own natural key; a preview puts only the accepted rows' keys into a
 * temporary table that the same look-up reads (previewKeys.ts), so its figures are the commit's
 * without writing results. Memory holds two chunks at most (the one in flight and the one the caller
 * is reading), never the file. A preview is rolled back
 * before anything is derived; a commit derives, re-screens, audits and commits, or rolls back
 * together if anything fails.
 */
export class ImportRun {
  private t: Transaction | null = null
  private batchId: number | null = null
  private readonly perReferral = new Map<number, { patientId: number; count: number }>()
  private readonly s: Omit<ImportSummary, 'batchId' | 'sameFileAs'>
  /** The last chunk's write, sent and not yet awaited (see addChunk); marked handled when sent. */
  private written: Promise<unknown> = Promise.resolve()
  private writeFailed = false
  /** The last addChunk, in flight or settled: the next one and abandon wait for it (see addChunk). */
  private lastChunk: Promise<unknown> = Promise.resolve()
  /** Each MRN's patient match, asked once per run (knownPatients.ts says why the answer cannot change). */
  private readonly patients = new KnownPatients()

  constructor(
    private readonly sequelize: Sequelize,
    private readonly viewer: Viewer,
    private readonly opts: { kind: ImportKind; commit: boolean; sourceName: string; fileName: string },
  ) {
    this.s = {
      kind: opts.kind,
      committed: false,
      rowsRead: 0,
      accepted: 0,
      skipped: [],
      skippedTotal: 0,
      skipCounts: {},
      acceptedRows: [],
      listCap: LIST_CAP,
      referralsAffected: 0,
      derived: 0,
      derivationsRefused: 0,
    }
  }

  async begin(): Promise<void> {
    // REPEATABLE READ named, not left to the server's default: the patient match's per-run answers
    // (knownPatients.ts) rest on every read of the run seeing one snapshot.
    this.t = await this.sequelize.transaction({ isolationLevel: Transaction.ISOLATION_LEVELS.REPEATABLE_READ })
    const batch = await ImportBatch.create(
      {
        kind: this.opts.kind,
        sourceName: this.opts.sourceName,
        fileName: this.opts.fileName.slice(0, 255),
        sha256: '0'.repeat(64),
        createdBy: this.viewer.userId,
        skipCounts: null,
        reversedAt: null,
        reversedBy: null,
        reversalReason: null,
        resultsRemoved: null,
      },
      { transaction: this.t },
    )
    this.batchId = batch.id
    if (!this.opts.commit) await createPreviewKeys(this.sequelize, this.t)
  }

  /**
   * The caller may parse and check the next chunk while this one is in flight (labCsv.ts), and
   * should send it only once this one has answered, so memory holds two chunks at most. Chunks
   * are matched in the order given whatever the caller does: each starts after the one before
   * has finished (the duplicate look-up must see every earlier chunk), and after a failed one
   * nothing more is sent and its error is thrown again.
   */
  addChunk(items: { row: number; checked: Checked }[]): Promise<ChunkOutcome> {
    const out = this.lastChunk.then(() => this.matchAndStore(items))
    // Handled here, so a chunk failing while the caller is still parsing is no unhandled rejection;
    // the caller gets its error from the promise returned.
    this.lastChunk = out
    out.catch(() => undefined)
    return out
  }

  private async matchAndStore(items: { row: number; checked: Checked }[]): Promise<ChunkOutcome> {
    // A write already known to have failed: nothing more is sent (its connection may be rolled back and returned).
    if (this.writeFailed) await this.written
    // Abandoned while this chunk waited its turn: nothing is sent outside the transaction.
    const t = this.t
    if (!t) throw new Error('import run chunk after the run ended')
    // Earlier chunks are already in the table (uncommitted); only this chunk needs remembering. The
    // previous chunk's write is awaited inside, after the patient match is sent and before the
    // duplicate look-up: it failed (thrown there), or it is in the table before it is read.
    const out = await matchChunk(
      this.sequelize,
      items,
      { batchId: this.batchId, seen: new Set(), previewKeys: !this.opts.commit, before: this.written, patients: this.patients },
      t,
    )
    this.s.rowsRead += items.length
    this.s.accepted += out.accepted.length
    this.s.skippedTotal += out.skipped.length
    for (const sk of out.skipped) {
      this.s.skipCounts[sk.code] = (this.s.skipCounts[sk.code] ?? 0) + 1
      if (this.s.skipped.length < LIST_CAP) this.s.skipped.push(sk)
    }
    for (const m of out.accepted) {
      const p = this.perReferral.get(m.referralId) ?? { patientId: m.patientId, count: 0 }
      p.count += 1
      this.perReferral.set(m.referralId, p)
      if (this.s.acceptedRows.length < LIST_CAP) {
        const r = m.reading
        this.s.acceptedRows.push({
          row: m.row,
          mrn: r.mrn,
          patient: m.patientName,
          referralId: m.referralId,
          analyte: r.analyte,
          analyteLabel: ANALYTE_DEFS[r.analyte].label,
          value: r.value,
          unit: r.unit,
          valueCanonical: r.valueCanonical,
          unitCanonical: ANALYTE_DEFS[r.analyte].canonicalUnit,
          takenAt: r.takenAt.toISOString(),
        })
      }
    }
    // The write is sent, not awaited: the run's one connection runs it before anything sent later,
    // so the server parses and checks the next chunk while MariaDB stores this one (two cores at
    // work). The next addChunk, finish or abandon waits for it, so only one write is ever in flight.
    if (this.t && out.accepted.length && !this.opts.commit) this.written = addPreviewKeys(this.sequelize, out.accepted, this.t)
    else if (this.t && out.accepted.length) {
      this.written = insertResults(
        this.sequelize,
        out.accepted.map((m) => ({
          referralId: m.referralId,
          patientId: m.patientId,
          analyte: m.reading.analyte,
          valueCanonical: m.reading.valueCanonical,
          valueReported: m.reading.value,
          unitReported: m.reading.unit,
          takenAt: m.reading.takenAt,
          takenAtUtc: m.takenAtUtc,
          enteredBy: this.viewer.userId,
          source: this.opts.kind,
          importBatchId: this.batchId,
        })),
        this.t,
      )
    }
    this.written.catch(() => {
      this.writeFailed = true
    })
    return out
  }

  async finish(sha256: string): Promise<ImportSummary> {
    await this.written
    this.s.referralsAffected = this.perReferral.size
    const earlier = await ImportBatch.findOne({
      where: { sha256, reversedAt: null, ...(this.batchId ? { id: { [Op.ne]: this.batchId } } : {}) },
      order: [['id', 'DESC']],
      transaction: this.t ?? undefined,
    })
    const sameFileAs = earlier ? { batchId: earlier.id, createdAt: isoOrNull(earlier.createdAt)! } : null
    const t = this.t
    if (!t) throw new Error('import run finished twice')
    if (!this.opts.commit || this.s.accepted === 0) {
      // A preview, or nothing to store: no rows and no empty batch are left behind.
      await this.abandon()
      return { ...this.s, sameFileAs }
    }
    const batchId = this.batchId!
    const d = { derived: 0, refused: 0 }
    const audit = { action: 'import-results', after: (results: number) => ({ importBatchId: batchId, results }) }
    await rescreenAndAudit(this.sequelize, this.viewer, this.perReferral, t, audit, async (writes) => {
      Object.assign(d, await deriveForBatch(this.sequelize, batchId, this.viewer.userId, t, writes))
    })
    this.s.derived = d.derived
    this.s.derivationsRefused = d.refused
    const counts = {
      rowsRead: this.s.rowsRead,
      accepted: this.s.accepted,
      skipped: this.s.skippedTotal,
      derived: d.derived,
      referralsAffected: this.perReferral.size,
      skipCounts: this.s.skipCounts,
    }
    await ImportBatch.update({ sha256, ...counts }, { where: { id: batchId }, transaction: t })
    await recordAudit(t, this.viewer, {
      action: 'import',
      entity: 'import_batch',
      entityId: batchId,
      after: { kind: this.opts.kind, source: this.opts.sourceName, fileName: this.opts.fileName, sha256, ...counts },
    })
    await t.commit()
    this.t = null
    return { ...this.s, batchId, committed: true, sameFileAs }
  }

  /**
   * Never throws, so the caller reports the error that made it give up (a lost database answers
   * 503): after a failed COMMIT sequelize counts the transaction finished and refuses a rollback,
   * and on a lost connection the rollback fails too; the server rolls back what its connection left.
   */
  async abandon(): Promise<void> {
    const t = this.t
    // A chunk in flight ends first (no write is sent once this.t is null); then its or the last write.
    this.t = null
    await this.lastChunk.catch(() => undefined)
    await this.written.catch(() => undefined)
    // A temporary table outlives a rollback on its pooled connection: dropped first.
    if (t && !this.opts.commit) await dropPreviewKeys(this.sequelize, t).catch(() => undefined)
    if (t) await t.rollback().catch(() => undefined)
  }
}
