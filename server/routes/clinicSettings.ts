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
    const b = req.body as ClinicSettingsInput
    res.json(
      await updateClinicSettings(sequelize, actorOf(req), {
        anaemiaCriteria: b.anaemiaCriteria,
        transfusionTriggerGL: b.transfusionTriggerGL,
        cardiovascularTriggerGL: b.cardiovascularTriggerGL,
        ironTargetHbGL: b.ironTargetHbGL,
        recheckDaysAfterLastDose: b.recheckDaysAfterLastDose,
        defaultSaO2: b.defaultSaO2,
        defaultPaO2MmHg: b.defaultPaO2MmHg,
        defaultCardiacIndexLMinM2: b.defaultCardiacIndexLMinM2,
        weightMaxAgeDays: b.weightMaxAgeDays,
        resultMaxAgeDays: b.resultMaxAgeDays,
        ironStudiesMaxAgeDays: b.ironStudiesMaxAgeDays,
      }),
    )
  })
  return api
}
