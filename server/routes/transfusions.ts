import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import {
  editTransfusionSchema,
  transfusionSchema,
  voidTransfusionSchema,
  type EditTransfusionInput,
  type TransfusionInput,
  type VoidTransfusionInput,
} from '../../shared/schemas/transfusions'
import { editTransfusion, listTransfusions, recordTransfusion, voidTransfusion } from '../services/transfusions'

/** The transfusion record: written by those who keep the post-operative record (surgeons for their own patients, in the service). */
export function transfusionRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')

  api.get('/:id/transfusions', { action: 'records.read' }, async (req, res) => {
    res.json(await listTransfusions(viewerOf(req), idParam(req)))
  })
  api.post('/:id/transfusions', { action: 'transfusions.record' }, validate(transfusionSchema), async (req, res) => {
    res.status(201).json(await recordTransfusion(sequelize, viewerOf(req), idParam(req), req.body as TransfusionInput))
  })
  api.put('/:id/transfusions/:transfusionId', { action: 'transfusions.record' }, validate(editTransfusionSchema), async (req, res) => {
    res.json(await editTransfusion(sequelize, viewerOf(req), idParam(req), idParam(req, 'transfusionId'), req.body as EditTransfusionInput))
  })
  api.post(
    '/:id/transfusions/:transfusionId/void',
    { action: 'transfusions.record' },
    validate(voidTransfusionSchema),
    async (req, res) => {
      const b = req.body as VoidTransfusionInput
      res.json(await voidTransfusion(sequelize, viewerOf(req), idParam(req), idParam(req, 'transfusionId'), b.reason))
    },
  )
  return api
}
