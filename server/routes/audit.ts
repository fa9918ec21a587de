import { ApiRouter } from './apiRouter'
import { signedInActor, type AppContext } from './context'
import { auditQuery, searchAudit } from '../services/auditSearch'
import { rowsToCsv } from '../services/reports/csv'

/**
 * The audit trail, read-only by design: there is deliberately no PUT, PATCH or DELETE here,
 * so no application path can change or remove an entry.
 */
export function auditRoutes(_ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/audit')

  api.get('', { action: 'audit.read' }, async (req, res) => {
    const q = auditQuery(req.query as Record<string, unknown>)
    const csv = req.query.format === 'csv'
    const result = await searchAudit(signedInActor(req), q, csv)
    if (!csv) {
      res.json(result)
      return
    }
    const rows = result.rows.map((r) => ({ ...r, userId: r.user?.id ?? null, userName: r.user?.name ?? null }))
    res.type('text/csv; charset=utf-8')
    res.attachment('audit-trail.csv')
    res.send(
      rowsToCsv(['id', 'at', 'userId', 'userName', 'action', 'entity', 'entityId', 'patientId', 'before', 'after', 'requestId'], rows),
    )
  })
  return api
}
