import type { Request } from 'express'
import { ApiRouter } from './apiRouter'
import { actorOf, type AppContext } from './context'
import { validate } from '../middleware/validate'
import { rebookRequestSchema, type RebookRequestInput } from '../../shared/schemas/appointments'
import { confirmByReply, lookupReply, rebookByReply } from '../services/appointmentReplies'

const tokenOf = (req: Request) => String(req.params.token ?? '')

/**
 * The patient's side: no account, the link's token is the only credential. POSTs still need
 * the session's CSRF token (GET /api/auth/csrf works without signing in).
 */
export function replyRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/replies')

  api.get('/:token', { action: 'replies.answer' }, async (req, res) => {
    res.set('Cache-Control', 'no-store')
    res.json(await lookupReply(config, tokenOf(req), actorOf(req)))
  })

  api.post('/:token/confirm', { action: 'replies.answer' }, async (req, res) => {
    res.json(await confirmByReply(sequelize, config, tokenOf(req), actorOf(req)))
  })

  api.post('/:token/rebook', { action: 'replies.answer' }, validate(rebookRequestSchema), async (req, res) => {
    const b = req.body as RebookRequestInput
    res.json(await rebookByReply(sequelize, config, tokenOf(req), actorOf(req), b.message ?? null))
  })

  return api
}
