import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import { hl7MessageQuerySchema, type Hl7MessageQuery } from '../../shared/schemas/hl7'
import type { Role } from '../../shared/roles'
// The HL7 services and their parser (@medplum) load on the first request here, not at boot:
// most servers never open this screen, and the library holds several MB of memory.
const hl7Interfaces = () => import('../services/hl7/interfaces')
const hl7Messages = () => import('../services/hl7/messages')

/** Admins run the interfaces; nurses clear the attention queue once they have registered a patient. */
const INTERFACE_STAFF: readonly Role[] = ['admin', 'nurse']

export function interfaceRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/interfaces')

  api.get('/hl7', { access: INTERFACE_STAFF }, async (_req, res) => {
    const { hl7Overview } = await hl7Interfaces()
    res.json(await hl7Overview(sequelize, config))
  })

  api.get('/hl7/messages', { access: INTERFACE_STAFF }, validate(hl7MessageQuerySchema, 'query'), async (_req, res) => {
    const q = res.locals.query as Hl7MessageQuery
    const { listMessages } = await hl7Messages()
    res.json(await listMessages({ q: q.q || undefined, outcome: q.outcome as never, attention: q.attention, limit: q.pageSize, offset: (q.page - 1) * q.pageSize }))
  })

  api.get('/hl7/messages/:id', { access: INTERFACE_STAFF }, async (req, res) => {
    const { readMessage } = await hl7Interfaces()
    res.json(await readMessage(viewerOf(req), idParam(req)))
  })

  api.post('/hl7/messages/:id/reprocess', { access: INTERFACE_STAFF }, async (req, res) => {
    const { processAgain } = await hl7Interfaces()
    res.json(await processAgain(sequelize, config, viewerOf(req), idParam(req)))
  })

  return api
}
