import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { episodeUpdates } from '../services/episodeUpdates'

/** The open episode screen's one poll (conditional: Express's ETag answers 304 when nothing changed). */
export function episodeUpdateRoutes(_ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')
  api.get('/:id/updates', { action: 'records.read' }, async (req, res) => {
    res.json(await episodeUpdates(viewerOf(req), idParam(req)))
  })
  return api
}
