import { ApiRouter } from './apiRouter'
import { signedInActor, type AppContext } from './context'
import { validate } from '../middleware/validate'
import {
  createProcedureSchema,
  updateProcedureSchema,
  type CreateProcedureInput,
  type UpdateProcedureInput,
} from '../../shared/schemas/procedures'
import { createProcedure, listProcedures, updateProcedure } from '../services/procedures'

export function procedureRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/procedures')

  api.get('', { action: 'procedures.read' }, async (req, res) => {
    res.json({ rows: await listProcedures(req.query.includeInactive === '1' || req.query.includeInactive === 'true') })
  })

  api.post('', { action: 'procedures.manage' }, validate(createProcedureSchema), async (req, res) => {
    res.status(201).json(await createProcedure(sequelize, signedInActor(req), req.body as CreateProcedureInput))
  })

  api.patch('/:code', { action: 'procedures.manage' }, validate(updateProcedureSchema), async (req, res) => {
    res.json(await updateProcedure(sequelize, signedInActor(req), String(req.params.code).toUpperCase(), req.body as UpdateProcedureInput))
  })

  return api
}
