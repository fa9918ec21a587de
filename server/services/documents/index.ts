import { createHash } from 'node:crypto'
import type { Sequelize, Transaction } from 'sequelize'
import type { Config } from '../../config'
import { EpisodeDocument, Letter, Referral, User } from '../../models/index'
import { isReadOnly } from '../../../shared/pathway'
import { DOCUMENT_KIND_LABELS, type DocumentKind, type UploadKind } from '../../../shared/schemas/documents'
import type { DocumentList, DocumentView } from '../../../shared/documents/views'
import { recordAudit } from '../audit'
import { loadReferral, type LoadedReferral } from '../episode'
import { assertMaySeeReferral, isoOrNull, type Viewer } from '../viewer'
import { NotFound, RuleRefused } from '../../errors'
import { cleanOriginalName, mediaTypeOf } from './content'
import { readStored, storeThenRecord } from './storage'

type DocumentRow = EpisodeDocument & { uploader?: User | null }

function toDocumentView(d: DocumentRow, letterId: number | null = null): DocumentView {
  return {
    id: d.id,
    referralId: d.referralId,
    kind: d.kind,
    kindLabel: DOCUMENT_KIND_LABELS[d.kind],
    title: d.title,
    originalName: d.originalName,
    mediaType: d.mediaType,
    sizeBytes: d.sizeBytes,
    sha256: d.sha256,
    uploadedBy: d.uploader ? { id: d.uploader.id, name: d.uploader.name } : null,
    uploadedAt: isoOrNull(d.uploadedAt)!,
    letterId,
  }
}

/** Documents are added only to open episodes; a closed one is a record that no longer changes. */
export async function referralForAttaching(viewer: Viewer, referralId: number, t?: Transaction): Promise<LoadedReferral> {
  const r = await loadReferral(viewer, referralId, t)
  if (isReadOnly(r.stage))
    throw new RuleRefused('This episode is closed and read-only: documents can no longer be added', 'closed_read_only')
  return r
}

export interface NewDocument {
  kind: DocumentKind
  title: string
  originalName: string
  mediaType: string
  bytes: Buffer
}

/**
 * Stores one file and its row (and audit) together; the caller's `extra` writes more rows in the
 * same transaction (a letter). A failure anywhere removes the file again.
 */
export async function saveDocument<T>(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  referralId: number,
  doc: NewDocument,
  extra: (t: Transaction, d: EpisodeDocument, r: LoadedReferral) => Promise<T>,
): Promise<T> {
  return storeThenRecord(config, doc.bytes, (storedName) =>
    sequelize.transaction(async (t) => {
      // Checked again inside the transaction: the episode may have closed since the request began.
      const r = await referralForAttaching(viewer, referralId, t)
      const d = await EpisodeDocument.create(
        {
          referralId,
          kind: doc.kind,
          title: doc.title,
          originalName: doc.originalName,
          storedName,
          mediaType: doc.mediaType,
          sizeBytes: doc.bytes.length,
          sha256: createHash('sha256').update(doc.bytes).digest('hex'),
          uploadedBy: viewer.userId,
          uploadedAt: new Date(),
        },
        { transaction: t },
      )
      await recordAudit(t, viewer, {
        action: 'create',
        entity: 'document',
        entityId: d.id,
        patientId: r.patientId,
        after: {
          kind: d.kind,
          title: d.title,
          originalName: d.originalName,
          mediaType: d.mediaType,
          sizeBytes: d.sizeBytes,
          sha256: d.sha256,
        },
      })
      return extra(t, d, r)
    }),
  )
}

export interface UploadInput {
  kind: UploadKind
  title: string
  originalName: string | undefined
  bytes: Buffer
}

export async function uploadDocument(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  referralId: number,
  input: UploadInput,
): Promise<DocumentView> {
  const originalName = cleanOriginalName(input.originalName)
  const mediaType = await mediaTypeOf(input.bytes, originalName)
  return saveDocument(
    sequelize,
    config,
    viewer,
    referralId,
    { kind: input.kind, title: input.title, originalName, mediaType, bytes: input.bytes },
    async (_t, d) => toDocumentView(d),
  )
}

export async function listDocuments(viewer: Viewer, referralId: number): Promise<DocumentList> {
  const r = await loadReferral(viewer, referralId)
  const [rows, letters] = await Promise.all([
    EpisodeDocument.findAll({
      where: { referralId },
      include: [{ model: User, as: 'uploader', attributes: ['id', 'name'] }],
      order: [
        ['uploadedAt', 'DESC'],
        ['id', 'DESC'],
      ],
    }),
    Letter.findAll({ where: { referralId }, attributes: ['id', 'documentId'], raw: true }),
  ])
  await recordAudit(null, viewer, { action: 'view', entity: 'documents', entityId: referralId, patientId: r.patientId })
  const letterOf = new Map(letters.map((l) => [l.documentId, l.id]))
  return { rows: (rows as DocumentRow[]).map((d) => toDocumentView(d, letterOf.get(d.id) ?? null)), readOnly: isReadOnly(r.stage) }
}

/** The stored bytes of a document, checked against the SHA-256 taken when it was stored. */
export async function openDocument(config: Config, viewer: Viewer, documentId: number) {
  const d = await EpisodeDocument.findByPk(documentId, { raw: true })
  if (!d) throw new NotFound('Document')
  const referral = await Referral.findByPk(d.referralId, { attributes: ['surgeonId', 'patientId'], raw: true })
  assertMaySeeReferral(viewer, referral!.surgeonId)
  const bytes = await readStored(config, d.storedName)
  if (createHash('sha256').update(bytes).digest('hex') !== d.sha256) {
    // Never hand out bytes that are not what was stored: that is a fault to investigate.
    throw new Error(`Stored file of document ${d.id} does not match its SHA-256`)
  }
  await recordAudit(null, viewer, { action: 'download', entity: 'document', entityId: d.id, patientId: referral!.patientId })
  return { bytes, mediaType: d.mediaType, fileName: d.originalName }
}
