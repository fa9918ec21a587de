import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { databaseIsUp } from '../services/health'

export function healthRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/health')
  api.get('', { access: 'public' }, async (_req, res) => {
    const up = await databaseIsUp(sequelize)
    res.status(up ? 200 : 503).json({ status: up ? 'ok' : 'degraded', db: up ? 'up' : 'down' })
  })
  return api
}
