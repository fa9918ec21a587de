import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import {
  createPatientSchema,
  patientSearchSchema,
  updatePatientSchema,
  type CreatePatientInput,
  type UpdatePatientInput,
} from '../../shared/schemas/patients'
import { createPatient, getPatient, searchPatients, updatePatient } from '../services/patients'

export function patientRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/patients')

  api.get('', { action: 'records.read' }, validate(patientSearchSchema, 'query'), async (req, res) => {
    res.json({ rows: await searchPatients(viewerOf(req), (res.locals.query as { q: string }).q) })
  })

  api.post('', { action: 'records.write' }, validate(createPatientSchema), async (req, res) => {
    const b = req.body as CreatePatientInput
    const input: CreatePatientInput = {
      mrn: b.mrn,
      givenName: b.givenName,
      familyName: b.familyName,
      dateOfBirth: b.dateOfBirth,
      sex: b.sex,
      heightCm: b.heightCm,
      weightKg: b.weightKg,
      measuredAt: b.measuredAt,
      email: b.email,
      phone: b.phone,
      gpPractice: b.gpPractice,
      notes: b.notes,
    }
    res.status(201).json(await createPatient(sequelize, viewerOf(req), input))
  })

  api.get('/:id', { action: 'records.read' }, async (req, res) => {
    res.json(await getPatient(viewerOf(req), idParam(req)))
  })

  api.patch('/:id', { action: 'records.write' }, validate(updatePatientSchema), async (req, res) => {
    const b = req.body as UpdatePatientInput
    const input: UpdatePatientInput = {
      version: b.version,
      mrn: b.mrn,
      givenName: b.givenName,
      familyName: b.familyName,
      dateOfBirth: b.dateOfBirth,
      sex: b.sex,
      heightCm: b.heightCm,
      weightKg: b.weightKg,
      measuredAt: b.measuredAt,
      email: b.email,
      phone: b.phone,
      gpPractice: b.gpPractice,
      notes: b.notes,
    }
    res.json(await updatePatient(sequelize, viewerOf(req), idParam(req), input))
  })

  return api
}
