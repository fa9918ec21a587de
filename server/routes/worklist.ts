import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import {
  worklistCountsQuerySchema,
  worklistQuerySchema,
  type WorklistCountsQuery,
  type WorklistQuery,
} from '../../shared/schemas/referrals'
import { worklist } from '../services/worklist'
import { worklistTiles } from '../services/worklistTiles'

export function worklistRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/worklist')
  api.get('', { action: 'records.read' }, validate(worklistQuerySchema, 'query'), async (req, res) => {
    res.json(await worklist(sequelize, viewerOf(req), res.locals.query as WorklistQuery))
  })
  // The home screens poll this once instead of the worklist once per count tile.
  api.get('/counts', { action: 'records.read' }, validate(worklistCountsQuerySchema, 'query'), async (req, res) => {
    res.json(await worklistTiles(sequelize, viewerOf(req), res.locals.query as WorklistCountsQuery))
  })
  return api
}
