import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { readiness } from '../services/health'
import { RETRY_AFTER_SECONDS } from '../dbUnavailable'
import type { LivenessView, NotReadyReason, ReadinessView } from '../../shared/health/views'

const NOT_READY_MESSAGES: Record<NotReadyReason, string> = {
  'database-unreachable': 'Ferrolane cannot reach its database just now; try again in a few seconds',
  'cluster-node-not-synced': "This Ferrolane process's database node is not in step with the cluster; try again in a few seconds",
  'migrations-pending': 'The database has not been brought up to this version of Ferrolane yet; try again once the upgrade has finished',
}

export function healthRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/health')
  // Liveness: answers while the process can serve HTTP at all, whatever the database does, so a
  // supervisor restarts only a process that is truly stuck.
  api.get('', { action: 'health.read' }, (_req, res) => {
    const body: LivenessView = { status: 'ok' }
    res.json(body)
  })
  // Readiness: what load balancers route by.
  api.get('/ready', { action: 'health.read' }, async (_req, res) => {
    const view: ReadinessView = await readiness(sequelize)
    if (view.status === 'ready') return void res.json(view)
    res.set('Retry-After', String(RETRY_AFTER_SECONDS))
    res.status(503).json({ ...view, error: { code: 'unavailable', message: NOT_READY_MESSAGES[view.reason!] } })
  })
  return api
}
