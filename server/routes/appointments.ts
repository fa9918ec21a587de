import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import {
  cancelAppointmentSchema,
  createAppointmentSchema,
  moveAppointmentSchema,
  type CancelAppointmentInput,
  type CreateAppointmentInput,
  type MoveAppointmentInput,
} from '../../shared/schemas/appointments'
import { bookAppointment, cancelAppointment, getAppointment, listReferralAppointments, moveAppointment } from '../services/appointments'

/** Booking, moving and cancelling: nurses and doctors; every staff role reads (surgeons their own). */
export function appointmentRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/appointments')

  api.post('', { action: 'appointments.book' }, validate(createAppointmentSchema), async (req, res) => {
    res.status(201).json(await bookAppointment(sequelize, config, viewerOf(req), req.body as CreateAppointmentInput))
  })

  api.get('/:id', { action: 'records.read' }, async (req, res) => {
    res.json(await getAppointment(viewerOf(req), idParam(req)))
  })

  api.patch('/:id', { action: 'appointments.book' }, validate(moveAppointmentSchema), async (req, res) => {
    res.json(await moveAppointment(sequelize, config, viewerOf(req), idParam(req), req.body as MoveAppointmentInput))
  })

  api.post('/:id/cancel', { action: 'appointments.book' }, validate(cancelAppointmentSchema), async (req, res) => {
    res.json(await cancelAppointment(sequelize, config, viewerOf(req), idParam(req), req.body as CancelAppointmentInput))
  })

  return api
}

/** An episode's appointments with their history and message statuses, beside the other referral routes. */
export function referralAppointmentRoutes(_ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')
  api.get('/:id/appointments', { action: 'records.read' }, async (req, res) => {
    res.json(await listReferralAppointments(viewerOf(req), idParam(req)))
  })
  return api
}
