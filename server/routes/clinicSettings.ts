import { ApiRouter } from './apiRouter'
import { actorOf, type AppContext } from './context'
import { validate } from '../middleware/validate'
import { clinicSettingsSchema, type ClinicSettingsInput } from '../../shared/schemas/clinicSettings'
import { getClinicSettings, updateClinicSettings } from '../services/clinicSettings'

export function clinicSettingsRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/settings/clinic')
  api.get('', { action: 'settings.read' }, async (_req, res) => {
    res.json(await getClinicSettings())
  })
  api.patch('', { action: 'settings.manage' }, validate(clinicSettingsSchema), async (req, res) => {
    res.json(await updateClinicSettings(sequelize, actorOf(req), req.body as ClinicSettingsInput))
  })
  return api
}
