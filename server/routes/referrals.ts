import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import {
  createReferralSchema,
  transitionSchema,
  updateReferralSchema,
  type CreateReferralInput,
  type TransitionInput,
  type UpdateReferralInput,
} from '../../shared/schemas/referrals'
import { createResultSchema, type CreateResultInput } from '../../shared/schemas/results'
import { cancelOperationSchema, type CancelOperationInput } from '../../shared/schemas/cancellations'
import { cancelPlannedOperation } from '../services/cancellations'
import { isAnalyte } from '../../shared/pathway'
import { createReferral, updateReferral } from '../services/referrals'
import { referralDetail } from '../services/referralDetail'
import { moveReferral } from '../services/transitions'
import { addResult, listResults } from '../services/results'
import { Invalid } from '../errors'

export function referralRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')

  api.post('', { action: 'records.write' }, validate(createReferralSchema), async (req, res) => {
    res.status(201).json(await createReferral(sequelize, viewerOf(req), req.body as CreateReferralInput))
  })

  api.get('/:id', { action: 'records.read' }, async (req, res) => {
    res.json(await referralDetail(viewerOf(req), idParam(req), { audit: true }))
  })

  api.patch('/:id', { action: 'records.write' }, validate(updateReferralSchema), async (req, res) => {
    res.json(await updateReferral(sequelize, viewerOf(req), idParam(req), req.body as UpdateReferralInput))
  })

  // Surgeons record the operation and may postpone or withdraw; the pathway table decides the rest.
  api.post('/:id/transitions', { action: 'pathway.move' }, validate(transitionSchema), async (req, res) => {
    res.json(await moveReferral(sequelize, viewerOf(req), idParam(req), req.body as TransitionInput))
  })

  // Surgeons may cancel their own patients' operations (the service checks whose), as they may postpone them.
  api.post('/:id/cancellation', { action: 'operations.cancel' }, validate(cancelOperationSchema), async (req, res) => {
    res.json(await cancelPlannedOperation(sequelize, viewerOf(req), idParam(req), req.body as CancelOperationInput))
  })

  api.post('/:id/results', { action: 'results.write' }, validate(createResultSchema), async (req, res) => {
    res.status(201).json(await addResult(sequelize, viewerOf(req), idParam(req), req.body as CreateResultInput))
  })

  api.get('/:id/results', { action: 'records.read' }, async (req, res) => {
    const analyte = req.query.analyte
    if (analyte !== undefined && !isAnalyte(analyte) && analyte !== 'egfr') {
      throw new Invalid('analyte filter is not a known analyte', { analyte: 'is not a known analyte' })
    }
    res.json({ rows: await listResults(viewerOf(req), idParam(req), analyte as string | undefined) })
  })

  return api
}
