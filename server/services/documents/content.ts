import { AppError, Invalid } from '../../errors'
import { UPLOAD_MEDIA_TYPES, UPLOAD_TYPES_TEXT, type UploadMediaType } from '../../../shared/schemas/documents'

// Types people most often send by mistake, named in words a clinician recognises.
const NAMED: Record<string, string> = {
  exe: 'a Windows program (EXE)',
  elf: 'a Linux program (ELF)',
  macho: 'a macOS program',
  msi: 'a Windows installer',
  gif: 'a GIF image',
  webp: 'a WebP image',
  heic: 'an HEIC photo',
  tif: 'a TIFF image',
  bmp: 'a BMP image',
  zip: 'a ZIP archive',
  docx: 'a Word document',
  doc: 'a Word document',
  xlsx: 'an Excel workbook',
  rtf: 'an RTF document',
  html: 'a web page',
}

function unsupported(message: string): AppError {
  return new AppError('unsupported_media_type', message, 415, { file: message })
}

/** Mostly printable bytes at the start: a text file (CSV, note, HTML saved as text). */
function looksLikeText(bytes: Buffer): boolean {
  const head = bytes.subarray(0, 1024)
  let printable = 0
  for (const b of head) if (b === 9 || b === 10 || b === 13 || (b >= 32 && b < 127) || b >= 160) printable += 1
  return head.length > 0 && printable / head.length > 0.95
}

function nameClaim(originalName: string): string {
  const ext = /\.([A-Za-z0-9]{1,8})$/.exec(originalName)?.[1]
  return ext ? `, although its name ends in .${ext.toLowerCase()}` : ''
}

/**
 * The media type from the file's content (magic bytes via file-type), never from its name or the
 * browser's claim. Anything but PDF, PNG or JPEG is a 415 that says what the file really is.
 */
export async function mediaTypeOf(bytes: Buffer, originalName: string): Promise<UploadMediaType> {
  if (bytes.length === 0) throw new Invalid('The file is empty', { file: 'is empty (0 bytes)' })
  // Loaded on the first upload (file-type's signature tables are several MB).
  const { fileTypeFromBuffer } = await import('file-type')
  const found = await fileTypeFromBuffer(bytes)
  if (found && found.mime in UPLOAD_MEDIA_TYPES) return found.mime as UploadMediaType
  const claim = nameClaim(originalName)
  if (found) {
    const what = NAMED[found.ext] ?? `of type ${found.mime}`
    throw unsupported(`The file is ${what}${claim}; only ${UPLOAD_TYPES_TEXT} files are accepted`)
  }
  const what = looksLikeText(bytes) ? 'plain text' : 'not a recognisable document'
  throw unsupported(`The file's content is ${what}${claim}; only ${UPLOAD_TYPES_TEXT} files are accepted`)
}

// Control characters in a file name could forge log lines or headers; matching them is the point.
// eslint-disable-next-line no-control-regex
const CONTROL_CHARACTERS = /[\u0000-\u001f\u007f]/g

/** What the uploader called the file, without any folder part or control characters. */
export function cleanOriginalName(name: string | undefined): string {
  const base = (name ?? '').split(/[\\/]/).pop() ?? ''
  const clean = base.replace(CONTROL_CHARACTERS, '').trim().slice(0, 255)
  return clean || 'document'
}
