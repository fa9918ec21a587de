import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import { followUpSchema, outcomeSchema, type FollowUpInput, type OutcomeInput } from '../../shared/schemas/outcomes'
import { getOutcome, recordFollowUp, recordOutcome } from '../services/outcomes'

/** After surgery: the post-operative record and the follow-up. Surgeons write for their own patients (checked in the service). */
export function outcomeRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')

  api.get('/:id/outcome', { action: 'records.read' }, async (req, res) => {
    res.json(await getOutcome(viewerOf(req), idParam(req)))
  })
  api.post('/:id/outcome', { action: 'outcomes.record' }, validate(outcomeSchema), async (req, res) => {
    res.status(201).json(await recordOutcome(sequelize, viewerOf(req), idParam(req), req.body as OutcomeInput))
  })
  api.post('/:id/follow-up', { action: 'outcomes.record' }, validate(followUpSchema), async (req, res) => {
    res.status(201).json(await recordFollowUp(sequelize, viewerOf(req), idParam(req), req.body as FollowUpInput))
  })
  return api
}
