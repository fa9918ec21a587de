import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { sendAttachment } from './documents'
import { openLetter, writeAppointmentLetter, writeFamilyDoctorLetter } from '../services/letters/index'

/** Letters written from an episode (kept on it as PDF documents): nurses and clinic doctors write; staff read. */
export function letterRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')
  api.post('/:id/letters', { action: 'letters.write' }, async (req, res) => {
    res.status(201).json(await writeFamilyDoctorLetter(sequelize, config, viewerOf(req), idParam(req)))
  })
  return api
}

/** A printed letter to the patient about one appointment, beside the other appointment routes. */
export function appointmentLetterRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/appointments')
  api.post('/:id/letter', { action: 'letters.write' }, async (req, res) => {
    res.status(201).json(await writeAppointmentLetter(sequelize, config, viewerOf(req), idParam(req)))
  })
  return api
}

export function letterDownloadRoutes({ config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/letters')
  api.get('/:id', { action: 'records.read' }, async (req, res) => {
    sendAttachment(res, await openLetter(config, viewerOf(req), idParam(req)))
  })
  return api
}
