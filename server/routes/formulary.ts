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
    const b = req.body as CreateIronProductInput
    res.status(201).json(
      await createProduct(sequelize, actorOf(req), {
        code: b.code,
        name: b.name,
        route: b.route,
        maxSingleDoseMg: b.maxSingleDoseMg,
        maxSingleDoseMgPerKg: b.maxSingleDoseMgPerKg,
        minIntervalDays: b.minIntervalDays,
        maxWeeklyMg: b.maxWeeklyMg,
        maxTotalMg: b.maxTotalMg,
        roundToMg: b.roundToMg,
        oralDailyMg: b.oralDailyMg,
        oralAlternateDays: b.oralAlternateDays,
        source: b.source,
        active: b.active,
        licensedFromAgeYears: b.licensedFromAgeYears,
        paediatricMaxSingleDoseMgPerKg: b.paediatricMaxSingleDoseMgPerKg,
        paediatricMaxSingleDoseMg: b.paediatricMaxSingleDoseMg,
        phosphateCheckOnRepeat: b.phosphateCheckOnRepeat,
      }),
    )
  })
  api.patch('/:code', { action: 'formulary.manage' }, validate(updateIronProductSchema), async (req, res) => {
    const b = req.body as UpdateIronProductInput
    res.json(
      await updateProduct(sequelize, actorOf(req), String(req.params.code), {
        name: b.name,
        route: b.route,
        maxSingleDoseMg: b.maxSingleDoseMg,
        maxSingleDoseMgPerKg: b.maxSingleDoseMgPerKg,
        minIntervalDays: b.minIntervalDays,
        maxWeeklyMg: b.maxWeeklyMg,
        maxTotalMg: b.maxTotalMg,
        roundToMg: b.roundToMg,
        oralDailyMg: b.oralDailyMg,
        oralAlternateDays: b.oralAlternateDays,
        source: b.source,
        active: b.active,
        licensedFromAgeYears: b.licensedFromAgeYears,
        paediatricMaxSingleDoseMgPerKg: b.paediatricMaxSingleDoseMgPerKg,
        paediatricMaxSingleDoseMg: b.paediatricMaxSingleDoseMg,
        phosphateCheckOnRepeat: b.phosphateCheckOnRepeat,
      }),
    )
  })
  // The product's own dosing table (weight band × Hb band) and whether plans use it.
  api.put('/:code/dosing-table', { action: 'formulary.manage' }, validate(dosingTableSchema), async (req, res) => {
    const b = req.body as DosingTableInput
    const table = b.table
      ? { weightBands: b.table.weightBands, hbBands: b.table.hbBands, needMg: b.table.needMg, source: b.table.source }
      : null
    res.json(await setDosingTable(sequelize, actorOf(req), String(req.params.code), { dosedByTable: b.dosedByTable, table }))
  })
  return api
}
