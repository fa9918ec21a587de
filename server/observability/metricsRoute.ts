import { createHash, timingSafeEqual } from 'node:crypto'
import type { RequestHandler } from 'express'
import type { Config } from '../config'
import type { AppMetrics } from './metrics'

const LOOPBACK = new Set(['127.0.0.1', '::1', '::ffff:127.0.0.1'])

/** Equal-time comparison of two strings of any length (hashes first, so lengths do not leak). */
function sameSecret(a: string, b: string): boolean {
  return timingSafeEqual(createHash('sha256').update(a).digest(), createHash('sha256').update(b).digest())
}

/**
 * GET /metrics, outside /api (no session, no CSRF, no audit). Allowed to:
 * - a caller with `Authorization: Bearer <METRICS_TOKEN>`;
 * - a caller on this machine, when no reverse proxy is configured (TRUST_PROXY=0). The address is
 *   the TCP peer's (req.socket), never req.ip: X-Forwarded-For is whatever the caller wrote. With
 *   a proxy in front every request arrives from the proxy, often on loopback, so then only the
 *   token opens it.
 * Anyone else gets a 404, as if there were nothing here; a wrong token gets a 403.
 */
export function metricsRoute(config: Config, metrics: AppMetrics): RequestHandler {
  return async (req, res) => {
    const auth = req.get('authorization') ?? ''
    const bearer = /^Bearer (\S+)$/i.exec(auth)?.[1]
    if (bearer !== undefined || auth) {
      if (!config.metricsToken || !bearer || !sameSecret(bearer, config.metricsToken)) {
        res.status(403).json({ error: { code: 'forbidden', message: 'The metrics token is not right' } })
        return
      }
    } else if (config.trustProxy > 0 || !LOOPBACK.has(req.socket.remoteAddress ?? '')) {
      res.status(404).json({ error: { code: 'not_found', message: 'Not found' } })
      return
    }
    res.set('Cache-Control', 'no-store')
    res.type(metrics.registry.contentType).send(await metrics.registry.metrics())
  }
}
