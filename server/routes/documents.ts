import type { Request, Response } from 'express'
import multer from 'multer'
import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { validateInput } from '../middleware/validate'
import { viewerOf } from './pathwayContext'
import { AppError, Invalid } from '../errors'
import { UPLOAD_MAX_BYTES, UPLOAD_MAX_MB, uploadDocumentSchema } from '../../shared/schemas/documents'
import { listDocuments, openDocument, referralForAttaching, uploadDocument } from '../services/documents/index'

// Surgeons may attach to their own patients' episodes (checked in the service), e.g. outside results.

// Held in memory (at most 10 MB) so nothing reaches the disk until the content has been checked.
const receive = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: UPLOAD_MAX_BYTES, files: 1, fields: 8, fieldSize: 4096, parts: 10 },
  defParamCharset: 'utf8',
}).single('file')

function multerRefusal(err: multer.MulterError): AppError {
  if (err.code === 'LIMIT_FILE_SIZE') {
    const message = `The file is larger than ${UPLOAD_MAX_MB} MB, the limit for episode documents`
    return new AppError('file_too_large', message, 413, { file: `must be at most ${UPLOAD_MAX_MB} MB` })
  }
  if (err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT') {
    return new Invalid('Send exactly one file, in the form field "file"', { file: 'send one file in the field "file"' })
  }
  return new Invalid(`The upload form is not valid (${err.message})`, { file: err.message })
}

/** Runs multer for one request; its refusals become our coded errors. */
function receiveFile(req: Request, res: Response): Promise<Express.Multer.File> {
  return new Promise((resolve, reject) => {
    receive(req, res, (err: unknown) => {
      if (err instanceof multer.MulterError) return reject(multerRefusal(err))
      if (err) return reject(err)
      if (!req.file)
        return reject(new Invalid('Choose a file to upload (PDF, PNG or JPEG) in the form field "file"', { file: 'is required' }))
      resolve(req.file)
    })
  })
}

/** Episode documents: upload, list, download. Every read and write is audited in the service. */
export function documentRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')

  api.post('/:id/documents', { action: 'documents.attach' }, async (req, res) => {
    const viewer = viewerOf(req)
    const referralId = idParam(req)
    // Who may attach, and whether the episode is open, is settled before the body is read.
    await referralForAttaching(viewer, referralId)
    const file = await receiveFile(req, res)
    const fields = await validateInput(uploadDocumentSchema, req.body)
    res.status(201).json(
      await uploadDocument(sequelize, config, viewer, referralId, {
        kind: fields.kind,
        title: fields.title,
        originalName: file.originalname,
        bytes: file.buffer,
      }),
    )
  })

  api.get('/:id/documents', { action: 'records.read' }, async (req, res) => {
    res.json(await listDocuments(viewerOf(req), idParam(req)))
  })
  return api
}

/** Sends stored bytes as a download that the browser must not render or sniff. */
export function sendAttachment(res: Response, file: { bytes: Buffer; mediaType: string; fileName: string }): void {
  res.attachment(file.fileName)
  res.set({
    'Content-Type': file.mediaType,
    'Content-Length': String(file.bytes.length),
    'X-Content-Type-Options': 'nosniff',
    'Cache-Control': 'private, no-store',
  })
  res.end(file.bytes)
}

export function documentDownloadRoutes({ config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/documents')
  api.get('/:id', { action: 'records.read' }, async (req, res) => {
    sendAttachment(res, await openDocument(config, viewerOf(req), idParam(req)))
  })
  return api
}
