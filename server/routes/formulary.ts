import { ApiRouter } from './apiRouter'
import { actorOf, type AppContext } from './context'
import { validate } from '../middleware/validate'
import {
  createIronProductSchema,
  updateIronProductSchema,
  type CreateIronProductInput,
  type UpdateIronProductInput,
} from '../../shared/schemas/formulary'
import { createProduct, listFormulary, updateProduct } from '../services/formulary'
import { setDosingTable } from '../services/formularyTable'
import { dosingTableSchema, type DosingTableInput } from '../../shared/schemas/dosingTable'

export function formularyRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/formulary')

  api.get('', { action: 'formulary.read' }, async (req, res) => {
    res.json({ rows: await listFormulary({ includeInactive: req.query.includeInactive === '1' }) })
  })
  api.post('', { action: 'formulary.manage' }, validate(createIronProductSchema), async (req, res) => {
    res.status(201).json(await createProduct(sequelize, actorOf(req), req.body as CreateIronProductInput))
  })
  api.patch('/:code', { action: 'formulary.manage' }, validate(updateIronProductSchema), async (req, res) => {
    res.json(await updateProduct(sequelize, actorOf(req), String(req.params.code), req.body as UpdateIronProductInput))
  })
  // The product's own dosing table (weight band × Hb band) and whether plans use it.
  api.put('/:code/dosing-table', { action: 'formulary.manage' }, validate(dosingTableSchema), async (req, res) => {
    res.json(await setDosingTable(sequelize, actorOf(req), String(req.params.code), req.body as DosingTableInput))
  })
  return api
}
