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
    res.status(201).json(await createPatient(sequelize, viewerOf(req), req.body as CreatePatientInput))
  })

  api.get('/:id', { action: 'records.read' }, async (req, res) => {
    res.json(await getPatient(viewerOf(req), idParam(req)))
  })

  api.patch('/:id', { action: 'records.write' }, validate(updatePatientSchema), async (req, res) => {
    res.json(await updatePatient(sequelize, viewerOf(req), idParam(req), req.body as UpdatePatientInput))
  })

  return api
}
