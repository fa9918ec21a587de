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
    const b = req.body as OutcomeInput
    res.status(201).json(
      await recordOutcome(sequelize, viewerOf(req), idParam(req), {
        surgeryDate: b.surgeryDate,
        bloodLossMl: b.bloodLossMl,
        unitsCrossmatched: b.unitsCrossmatched,
        lowestHbGL: b.lowestHbGL,
        dischargeHbGL: b.dischargeHbGL,
        lengthOfStayDays: b.lengthOfStayDays,
        complications: b.complications,
        version: b.version,
        tranexamicAcidGiven: b.tranexamicAcidGiven,
        tranexamicAcidDoseMg: b.tranexamicAcidDoseMg,
        tranexamicAcidTiming: b.tranexamicAcidTiming,
        cellSalvageUsed: b.cellSalvageUsed,
        cellSalvageReturnedMl: b.cellSalvageReturnedMl,
        transfusionInformationGiven: b.transfusionInformationGiven,
        transfusionConsent: b.transfusionConsent,
        postOperativeIronGiven: b.postOperativeIronGiven,
      }),
    )
  })
  api.post('/:id/follow-up', { action: 'outcomes.record' }, validate(followUpSchema), async (req, res) => {
    const b = req.body as FollowUpInput
    res.status(201).json(
      await recordFollowUp(sequelize, viewerOf(req), idParam(req), {
        recheckHbGL: b.recheckHbGL,
        recheckDate: b.recheckDate,
        ironAfterSurgery: b.ironAfterSurgery,
        notes: b.notes,
        version: b.version,
      }),
    )
  })
  return api
}
