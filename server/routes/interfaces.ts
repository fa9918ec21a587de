import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import { hl7MessageQuerySchema, type Hl7MessageQuery } from '../../shared/schemas/hl7'
import { allows } from '../../shared/permissions'
// The HL7 services and their parser (@medplum) load on the first request here, not at boot:
// most servers never open this screen, and the library holds several MB of memory.
const hl7Interfaces = () => import('../services/hl7/interfaces')
const hl7Messages = () => import('../services/hl7/messages')

/**
 * Admins run the interfaces and see no patient in them; nurses read the messages and clear the
 * attention queue once they have registered a patient (shared/permissions.ts).
 */
export function interfaceRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/interfaces')

  api.get('/hl7', { action: 'hl7.overview' }, async (_req, res) => {
    const { hl7Overview } = await hl7Interfaces()
    res.json(await hl7Overview(sequelize, config))
  })

  api.get('/hl7/messages', { action: 'hl7.listMessages' }, validate(hl7MessageQuerySchema, 'query'), async (req, res) => {
    const q = res.locals.query as Hl7MessageQuery
    const { listMessages } = await hl7Messages()
    res.json(
      await listMessages(
        { q: q.q || undefined, outcome: q.outcome as never, attention: q.attention, limit: q.pageSize, offset: (q.page - 1) * q.pageSize },
        allows(req.user!.role, 'hl7.patientDetail'),
      ),
    )
  })

  api.get('/hl7/messages/:id', { action: 'hl7.readMessage' }, async (req, res) => {
    const { readMessage } = await hl7Interfaces()
    res.json(await readMessage(viewerOf(req), idParam(req)))
  })

  api.post('/hl7/messages/:id/reprocess', { action: 'hl7.processAgain' }, async (req, res) => {
    const { processAgain } = await hl7Interfaces()
    res.json(await processAgain(sequelize, config, viewerOf(req), idParam(req)))
  })

  return api
}
