import type { RequestHandler } from 'express'
import multer from 'multer'
import { readFile, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate, validateInput, screenKeys } from '../middleware/validate'
import { jsonBody, parseJsonText } from '../middleware/jsonBody'
import { ValidationError } from 'yup'
import { MAX_CSV_BYTES, MAX_FHIR_BYTES, type ColumnMapping } from '../../shared/imports'
import {
  asColumnMapping,
  columnMappingSchema,
  fhirImportQuerySchema,
  labImportFieldsSchema,
  reversalSchema,
  saveMappingSchema,
  sourceNameField,
  type ReversalInput,
} from '../../shared/schemas/imports'
// The CSV parser, the FHIR checks and file-type sniffing load on the first upload, not at boot.
const labCsv = () => import('../services/imports/labCsv')
const fhirImport = () => import('../services/imports/fhir')
import { getBatch, listBatches, reverseBatch } from '../services/imports/batches'
import { listMappings, mappingFor, saveMapping } from '../services/imports/mappings'
import { AppError, Invalid } from '../errors'

/**
 * Results arrive from the laboratory through the people who screen: nurses and doctors upload,
 * preview (which shows patients) and commit, and take a batch back out. Administrators keep the
 * column mappings and see the batch list, which names no patient.
 */
const MB = (n: number) => `${Math.round(n / 1024 / 1024)} MB`

// Uploads go to the system's temporary directory under random names and are deleted after use.
const uploadDir = path.join(tmpdir(), 'ferrolane-imports')

function single(m: multer.Multer, limit: number): RequestHandler {
  const handle = m.single('file')
  return (req, res, next) =>
    handle(req, res, (err: unknown) => {
      if (!err) return next()
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE')
          return next(
            new AppError('too_large', `The file is larger than the ${MB(limit)} limit; split it or export a shorter period`, 413, {
              file: `must be at most ${MB(limit)}`,
            }),
          )
        return next(new Invalid(`The upload was not understood: ${err.message} (send one file in the field "file")`, { file: err.message }))
      }
      next(err)
    })
}

const csvUpload = single(
  multer({ dest: uploadDir, limits: { fileSize: MAX_CSV_BYTES, files: 1, fields: 10, fieldSize: 256 * 1024 } }),
  MAX_CSV_BYTES,
)
const fhirUpload = single(
  multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_FHIR_BYTES, files: 1, fields: 10 } }),
  MAX_FHIR_BYTES,
)

const CSV_NAME = /\.(csv|txt|tsv)$/i
const CSV_TYPES = [
  'text/csv',
  'text/plain',
  'application/csv',
  'application/vnd.ms-excel',
  'text/tab-separated-values',
  'application/octet-stream',
]

/** A CSV is text: refuse by content (a known binary signature, or NUL bytes), not only by name. */
async function assertCsv(file: Express.Multer.File): Promise<void> {
  const refuse = (why: string) =>
    new AppError('unsupported_type', `${why}; upload the laboratory export as a CSV text file`, 415, { file: 'must be a CSV file' })
  if (!CSV_NAME.test(file.originalname) && !CSV_TYPES.slice(0, 5).includes(file.mimetype))
    throw refuse(`"${file.originalname}" is not a .csv file`)
  if (!CSV_TYPES.includes(file.mimetype)) throw refuse(`the file was sent as ${file.mimetype}`)
  const { fileTypeFromFile } = await import('file-type')
  const detected = await fileTypeFromFile(file.path)
  if (detected) throw refuse(`the file's content is ${detected.mime} (${detected.ext}), not text`)
  const head = (await readFile(file.path)).subarray(0, 64 * 1024)
  if (head.includes(0)) throw refuse('the file contains binary data')
}

async function mappingFromField(raw: string): Promise<ColumnMapping> {
  const parsed = parseJsonText(raw, () => new Invalid('mapping must be JSON (the column mapping)', { mapping: 'is not valid JSON' }))
  return asColumnMapping(await validateInput(columnMappingSchema, parsed))
}

export function importRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/imports')

  api.post('/lab-results', { action: 'imports.run' }, csvUpload, async (req, res) => {
    const file = req.file
    try {
      const fields = await validateInput(labImportFieldsSchema, req.body)
      if (!file) throw new Invalid('file is required (the laboratory CSV, in the multipart field "file")', { file: 'is required' })
      await assertCsv(file)
      const mapping = fields.mapping ? await mappingFromField(fields.mapping) : (await mappingFor(fields.source)).mapping
      const { importLabCsv } = await labCsv()
      const out = await importLabCsv(
        sequelize,
        viewerOf(req),
        { filePath: file.path, fileName: file.originalname, sourceName: fields.source, mapping, commit: fields.commit === 'true' },
        config.clinic.timeZone,
        config.imports.maxCsvRows,
      )
      res.status(out.batchId ? 201 : 200).json(out)
    } finally {
      if (file) await rm(file.path, { force: true })
    }
  })

  // FHIR's own media type gets a raised limit here; plain application/json passes the app's 1 MB parser.
  api.post(
    '/fhir',
    { action: 'imports.run' },
    ...jsonBody({ type: ['application/fhir+json'], limit: MAX_FHIR_BYTES }),
    fhirUpload,
    validate(fhirImportQuerySchema, 'query'),
    async (req, res) => {
      const q = res.locals.query as { commit: string; storeValid: string; source: string }
      let bundle: unknown = req.body
      if (req.file) {
        bundle = parseJsonText(
          req.file.buffer.toString('utf8'),
          () => new Invalid('The file is not valid JSON (a FHIR R4 Bundle was expected)', { file: 'is not valid JSON' }),
        )
      }
      screenKeys(bundle)
      const { importFhirBundle } = await fhirImport()
      const out = await importFhirBundle(sequelize, viewerOf(req), bundle, {
        commit: q.commit === 'true',
        storeValid: q.storeValid === 'true',
        sourceName: q.source,
      })
      res.status(out.batchId ? 201 : 200).json(out)
    },
  )

  api.get('/mappings', { action: 'imports.read' }, async (_req, res) => {
    res.json({ rows: await listMappings() })
  })

  api.get('/mappings/:source', { action: 'imports.read' }, async (req, res) => {
    res.json(await mappingFor(await sourceOf(req.params.source)))
  })

  api.put('/mappings/:source', { action: 'imports.mappingsEdit' }, validate(saveMappingSchema), async (req, res) => {
    const source = await sourceOf(req.params.source)
    const mapping = asColumnMapping((req.body as { mapping: Parameters<typeof asColumnMapping>[0] }).mapping)
    res.json(await saveMapping(sequelize, viewerOf(req), source, mapping))
  })

  api.get('', { action: 'imports.read' }, async (_req, res) => {
    res.json({ rows: await listBatches() })
  })

  api.get('/:id', { action: 'imports.read' }, async (req, res) => {
    res.json(await getBatch(idParam(req)))
  })

  api.post('/:id/reversal', { action: 'imports.run' }, validate(reversalSchema), async (req, res) => {
    const { reason } = req.body as ReversalInput
    res.json(await reverseBatch(sequelize, viewerOf(req), idParam(req), reason))
  })

  return api
}

async function sourceOf(raw: unknown): Promise<string> {
  try {
    return await sourceNameField.validate(raw)
  } catch (err) {
    if (err instanceof ValidationError) throw new Invalid(err.message, { source: err.message })
    throw err
  }
}
