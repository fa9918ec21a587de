import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import {
  administrationSchema,
  dosePlanPreviewSchema,
  prescriptionSchema,
  readinessActionSchema,
  reviewSchema,
  type AdministrationInput,
  type DosePlanPreviewInput,
  type PrescriptionInput,
  type ReadinessActionInput,
  type ReviewInput,
} from '../../shared/schemas/clinic'
import { listReviews, recordReview } from '../services/clinicReview'
import { listPrescriptions, prescribe, previewDosePlan } from '../services/prescriptions'
import { listAdministrations, recordAdministration } from '../services/administrations'
import { projectionFor } from '../services/projection'
import { listReadinessReviews, recordReadinessAction } from '../services/readiness'
import { Invalid } from '../errors'

/** Anaemia clinic and theatre readiness, on an episode. */
export function clinicRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')

  api.get('/:id/reviews', { action: 'records.read' }, async (req, res) => {
    res.json({ rows: await listReviews(viewerOf(req), idParam(req)) })
  })
  api.post('/:id/reviews', { action: 'reviews.write' }, validate(reviewSchema), async (req, res) => {
    res.status(201).json(await recordReview(sequelize, viewerOf(req), idParam(req), req.body as ReviewInput))
  })

  // Computed by the server with the clinical library, shown before saving.
  api.post('/:id/dose-plan', { action: 'prescriptions.plan' }, validate(dosePlanPreviewSchema), async (req, res) => {
    res.json(await previewDosePlan(viewerOf(req), idParam(req), req.body as DosePlanPreviewInput))
  })
  api.get('/:id/prescriptions', { action: 'records.read' }, async (req, res) => {
    res.json({ rows: await listPrescriptions(viewerOf(req), idParam(req)) })
  })
  api.post('/:id/prescriptions', { action: 'prescriptions.sign' }, validate(prescriptionSchema), async (req, res) => {
    res.status(201).json(await prescribe(sequelize, viewerOf(req), idParam(req), req.body as PrescriptionInput))
  })

  api.get('/:id/administrations', { action: 'records.read' }, async (req, res) => {
    res.json({ rows: await listAdministrations(viewerOf(req), idParam(req)) })
  })
  api.post('/:id/administrations', { action: 'administrations.record' }, validate(administrationSchema), async (req, res) => {
    res.status(201).json(await recordAdministration(sequelize, viewerOf(req), idParam(req), req.body as AdministrationInput))
  })

  api.get('/:id/projection', { action: 'records.read' }, async (req, res) => {
    const raw = req.query.cardiacOutputLMin
    let cardiacOutputLMin: number | undefined
    if (raw !== undefined && raw !== '') {
      cardiacOutputLMin = Number(raw)
      if (!Number.isFinite(cardiacOutputLMin) || cardiacOutputLMin < 1 || cardiacOutputLMin > 20) {
        throw new Invalid('cardiacOutputLMin must be between 1 and 20 L/min', { cardiacOutputLMin: 'must be between 1 and 20 L/min' })
      }
    }
    res.json(await projectionFor(viewerOf(req), idParam(req), { cardiacOutputLMin }))
  })

  api.get('/:id/readiness', { action: 'records.read' }, async (req, res) => {
    res.json({ rows: await listReadinessReviews(viewerOf(req), idParam(req)) })
  })
  // Only the operating surgeon answers; a nurse cannot acknowledge on a surgeon's behalf.
  api.post('/:id/readiness', { action: 'readiness.answer' }, validate(readinessActionSchema), async (req, res) => {
    res.status(201).json(await recordReadinessAction(sequelize, viewerOf(req), idParam(req), req.body as ReadinessActionInput))
  })
  return api
}
