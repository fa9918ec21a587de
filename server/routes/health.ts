import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { databaseIsUp } from '../services/health'
import { RETRY_AFTER_SECONDS } from '../dbUnavailable'

export function healthRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/health')
  api.get('', { access: 'public' }, async (_req, res) => {
    const up = await databaseIsUp(sequelize)
    if (up) return void res.json({ status: 'ok', db: 'up' })
    // The same 503 as every other route while the database is away, with the probe's own fields.
    res.set('Retry-After', String(RETRY_AFTER_SECONDS))
    res.status(503).json({ status: 'degraded', db: 'down', error: { code: 'unavailable', message: 'Ferrolane cannot reach its database just now; try again in a few seconds' } })
  })
  return api
}
