import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import {
  createInfusionSessionSchema,
  sessionRangeSchema,
  updateInfusionSessionSchema,
  type CreateInfusionSessionInput,
  type SessionRangeQuery,
  type UpdateInfusionSessionInput,
} from '../../shared/schemas/appointments'
import { createInfusionSession, listInfusionSessions, updateInfusionSession } from '../services/infusionSessions'

/** Admins keep the infusion unit's sessions; the nurses and doctors who book read them. */
export function infusionSessionRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/infusion-sessions')

  api.get('', { action: 'infusionSessions.read' }, validate(sessionRangeSchema, 'query'), async (_req, res) => {
    res.json(await listInfusionSessions(config, res.locals.query as SessionRangeQuery))
  })

  api.post('', { action: 'infusionSessions.manage' }, validate(createInfusionSessionSchema), async (req, res) => {
    res.status(201).json(await createInfusionSession(sequelize, config, viewerOf(req), req.body as CreateInfusionSessionInput))
  })

  api.patch('/:id', { action: 'infusionSessions.manage' }, validate(updateInfusionSessionSchema), async (req, res) => {
    res.json(await updateInfusionSession(sequelize, config, viewerOf(req), idParam(req), req.body as UpdateInfusionSessionInput))
  })

  return api
}
