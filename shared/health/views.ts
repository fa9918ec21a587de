/** GET /api/health: the process is alive and serving; it does not touch the database. */
export interface LivenessView {
  status: 'ok'
}

/** Why a process is not ready for traffic, in the order the readiness probe checks. */
export type NotReadyReason = 'database-unreachable' | 'cluster-node-not-synced' | 'migrations-pending'

/**
 * GET /api/health/ready: 200 when the database answers, every migration this build knows is
 * applied and, on a Galera cluster, the node is synced; otherwise 503 with `reason` and the
 * usual `unavailable` error body. Load balancers route by it.
 */
export interface ReadinessView {
  status: 'ready' | 'not-ready'
  db: 'up' | 'down'
  /** 'standalone' when the database is a single server (wsrep off). */
  cluster: 'synced' | 'not-synced' | 'standalone' | 'unknown'
  migrations: 'current' | 'pending' | 'unknown'
  reason?: NotReadyReason
}
