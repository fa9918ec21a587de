import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { validate } from '../middleware/validate'
import { outboxQuerySchema, type OutboxQuery } from '../../shared/schemas/appointments'
import { listOutbox } from '../services/outbox'

/** Patient messages and how they went; surgeons have no part in sending them. */
export function outboxRoutes(_ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/outbox')
  api.get('', { action: 'outbox.read' }, validate(outboxQuerySchema, 'query'), async (_req, res) => {
    res.json(await listOutbox(res.locals.query as OutboxQuery))
  })
  return api
}
