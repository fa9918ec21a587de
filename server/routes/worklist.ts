import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { CLINICAL_READERS, viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import { worklistQuerySchema, type WorklistQuery } from '../../shared/schemas/referrals'
import { worklist } from '../services/worklist'

export function worklistRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/worklist')
  api.get('', { access: CLINICAL_READERS }, validate(worklistQuerySchema, 'query'), async (req, res) => {
    res.json(await worklist(sequelize, viewerOf(req), res.locals.query as WorklistQuery))
  })
  return api
}
