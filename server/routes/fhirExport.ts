import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { exportReferralBundle } from '../services/fhirExport/index'
import { viewerOf } from './pathwayContext'

/** The episode as a FHIR R4 Bundle, for the hospital record or another service. Staff only; audited. */
export function fhirExportRoutes({ config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/referrals')
  api.get('/:id/fhir', { action: 'records.read' }, async (req, res) => {
    const id = idParam(req)
    const bundle = await exportReferralBundle(config, viewerOf(req), id)
    res.attachment(`ferrolane-episode-${id}.fhir.json`)
    res.set({ 'Content-Type': 'application/fhir+json; charset=utf-8', 'Cache-Control': 'private, no-store' })
    res.send(JSON.stringify(bundle))
  })
  return api
}
