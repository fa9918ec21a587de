import type { DocumentKind } from '../schemas/documents'

/*
 * The documents and letters API's answers (server/services/documents/index.ts,
 * server/services/letters/index.ts). The server's mappers declare these and the client imports them.
 */

/** One file kept on an episode. */
export interface DocumentView {
  id: number
  referralId: number
  kind: DocumentKind
  kindLabel: string
  title: string
  originalName: string
  mediaType: string
  sizeBytes: number
  sha256: string
  uploadedBy: { id: number; name: string } | null
  uploadedAt: string
  /** Set when the document is a letter the clinic wrote. */
  letterId: number | null
}

/** GET /api/referrals/:id/documents: `readOnly` when the episode is closed (no more uploads). */
export interface DocumentList {
  rows: DocumentView[]
  readOnly: boolean
}

/** POST /api/referrals/:id/letters (and the appointment letter): the letter and the document that keeps its PDF. */
export interface WrittenLetter {
  id: number
  documentId: number
}
