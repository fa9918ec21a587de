import * as yup from 'yup'

/** What a document on an episode is. 'letter' is the clinic's own letters, made by the server, never uploaded. */
export const DOCUMENT_KINDS = ['referral-letter', 'outside-results', 'letter', 'other'] as const
export type DocumentKind = (typeof DOCUMENT_KINDS)[number]
export const UPLOAD_KINDS = ['referral-letter', 'outside-results', 'other'] as const satisfies readonly DocumentKind[]
export type UploadKind = (typeof UPLOAD_KINDS)[number]

export const DOCUMENT_KIND_LABELS: Record<DocumentKind, string> = {
  'referral-letter': 'Referral letter',
  'outside-results': 'Results from elsewhere',
  letter: 'Letter from the clinic',
  other: 'Other',
}

/** Stated on the upload form and enforced by the server with the same number. */
export const UPLOAD_MAX_MB = 10
export const UPLOAD_MAX_BYTES = UPLOAD_MAX_MB * 1024 * 1024

/** Media types accepted, recognised from the content (magic bytes), never from the file name. */
export const UPLOAD_MEDIA_TYPES = { 'application/pdf': 'PDF', 'image/png': 'PNG', 'image/jpeg': 'JPEG' } as const
export type UploadMediaType = keyof typeof UPLOAD_MEDIA_TYPES
export const UPLOAD_TYPES_TEXT = 'PDF, PNG or JPEG'

/** The text fields sent with the file (multipart form fields). */
export const uploadDocumentSchema = yup.object({
  kind: yup
    .string()
    .oneOf([...UPLOAD_KINDS], `Kind must be one of: ${UPLOAD_KINDS.map((k) => DOCUMENT_KIND_LABELS[k]).join(', ')}`)
    .required('Kind is required'),
  title: yup.string().trim().min(1, 'Title is required').max(200, 'Title must be at most 200 characters').required('Title is required'),
})
export type UploadDocumentInput = yup.InferType<typeof uploadDocumentSchema>
