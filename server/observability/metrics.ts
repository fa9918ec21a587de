import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from 'prom-client'
import { QueryTypes, type Sequelize } from 'sequelize'
import type { RequestHandler } from 'express'
import { routeLabel } from './logger'

/**
 * What an operator graphs and alerts on, in Prometheus' text format. Every label is bounded: the
 * route is the pattern ApiRouter registered (about a hundred of them), never the raw URL, and the
 * status is its class (2xx..5xx). One registry per app, so tests that build several apps in one
 * process each count their own.
 */
export interface AppMetrics {
  registry: Registry
  /** Counts a request when its response has finished. */
  observe: RequestHandler
  /** A database error reached the error handler: `unavailable` (no connection) or `query`. */
  databaseError(kind: 'unavailable' | 'query'): void
}

// Slow enough to see a worklist on a busy morning, fine enough to see a fast one.
const LATENCY_BUCKETS = [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10]

interface PoolLike {
  size?: number
  available?: number
  using?: number
  waiting?: number
  maxSize?: number
}

export function createMetrics(sequelize: Sequelize, poolMax: number): AppMetrics {
  const registry = new Registry()
  // Process CPU, memory, handles, GC and event-loop lag (nodejs_eventloop_lag_*).
  collectDefaultMetrics({ register: registry, prefix: 'ferrolane_' })

  const requests = new Counter({
    name: 'ferrolane_http_requests_total',
    help: 'HTTP requests finished, by route pattern and status class',
    labelNames: ['method', 'route', 'status'] as const,
    registers: [registry],
  })
  const latency = new Histogram({
    name: 'ferrolane_http_request_duration_seconds',
    help: 'Time from request to finished response, by route pattern',
    labelNames: ['method', 'route', 'status'] as const,
    buckets: LATENCY_BUCKETS,
    registers: [registry],
  })
  const dbErrors = new Counter({
    name: 'ferrolane_db_errors_total',
    help: 'Database errors that reached the error handler',
    labelNames: ['kind'] as const,
    registers: [registry],
  })
  dbErrors.inc({ kind: 'unavailable' }, 0)
  dbErrors.inc({ kind: 'query' }, 0)

  // Sequelize's pool (sequelize-pool) keeps its figures on the connection manager.
  const pool = () => (sequelize.connectionManager as Sequelize['connectionManager'] & { pool?: PoolLike }).pool ?? {}
  new Gauge({
    name: 'ferrolane_db_pool_max',
    help: 'Most connections the pool may open (DB_POOL_MAX)',
    registers: [registry],
    collect() {
      this.set(poolMax)
    },
  })
  new Gauge({
    name: 'ferrolane_db_pool_open',
    help: 'Connections the pool has open',
    registers: [registry],
    collect() {
      this.set(pool().size ?? 0)
    },
  })
  new Gauge({
    name: 'ferrolane_db_pool_in_use',
    help: 'Connections lent to a query or transaction',
    registers: [registry],
    collect() {
      this.set(pool().using ?? 0)
    },
  })
  new Gauge({
    name: 'ferrolane_db_pool_waiting',
    help: 'Requests waiting for a connection',
    registers: [registry],
    collect() {
      this.set(pool().waiting ?? 0)
    },
  })

  // Read from the database at scrape time; while it is away the scrape still answers, with -1.
  const query = async <T extends object>(sql: string): Promise<T | null> => {
    try {
      const [row] = await sequelize.query<T>(sql, { type: QueryTypes.SELECT })
      return row ?? null
    } catch {
      dbErrors.inc({ kind: 'query' })
      return null
    }
  }
  new Gauge({
    name: 'ferrolane_outbox_backlog',
    help: 'Patient e-mails queued or being sent (-1: the database could not be read)',
    registers: [registry],
    async collect() {
      const r = await query<{ n: number }>(`SELECT COUNT(*) AS n FROM outbox_messages WHERE status IN ('queued', 'sending')`)
      this.set(r ? Number(r.n) : -1)
    },
  })
  new Gauge({
    name: 'ferrolane_outbox_oldest_age_seconds',
    help: 'Age of the oldest e-mail still waiting to be sent (0: none waiting; -1: unreadable)',
    registers: [registry],
    async collect() {
      const r = await query<{ age: number | null }>(
        `SELECT TIMESTAMPDIFF(SECOND, MIN(created_at), UTC_TIMESTAMP()) AS age FROM outbox_messages WHERE status IN ('queued', 'sending')`,
      )
      this.set(r ? Math.max(0, Number(r.age ?? 0)) : -1)
    },
  })
  new Gauge({
    name: 'ferrolane_hl7_attention_queue',
    help: 'HL7 messages waiting for someone in the attention queue (-1: unreadable)',
    registers: [registry],
    async collect() {
      const r = await query<{ n: number }>('SELECT COUNT(*) AS n FROM hl7_messages WHERE needs_attention = 1')
      this.set(r ? Number(r.n) : -1)
    },
  })

  const observe: RequestHandler = (req, res, next) => {
    const end = latency.startTimer()
    res.once('finish', () => {
      const labels = { method: req.method, route: routeLabel(req, res), status: `${Math.floor(res.statusCode / 100)}xx` }
      end(labels)
      requests.inc(labels)
    })
    next()
  }
  return { registry, observe, databaseError: (kind) => dbErrors.inc({ kind }) }
}
