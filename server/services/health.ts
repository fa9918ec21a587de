import { QueryTypes, type Sequelize } from 'sequelize'
import { migrations } from '../migrations/index'
import type { ReadinessView } from '../../shared/health/views'

const DB_CHECK_TIMEOUT_MS = 2000
/** wsrep_local_state 4 is "Synced": the node has applied the whole cluster history. */
const WSREP_SYNCED = '4'

function withTimeout<T>(work: Promise<T>): Promise<T> {
  let timer: NodeJS.Timeout | undefined
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error('timeout')), DB_CHECK_TIMEOUT_MS)
  })
  return Promise.race([work, timeout]).finally(() => clearTimeout(timer))
}

async function clusterState(sequelize: Sequelize): Promise<'synced' | 'not-synced' | 'standalone'> {
  // SHOW answers even on a node that refuses ordinary queries (error 1047) while not synced.
  const vars = await sequelize.query<{ Variable_name: string; Value: string }>("SHOW GLOBAL VARIABLES LIKE 'wsrep_on'", {
    type: QueryTypes.SELECT,
  })
  if (vars[0]?.Value !== 'ON') return 'standalone'
  const status = await sequelize.query<{ Variable_name: string; Value: string }>(
    "SHOW GLOBAL STATUS WHERE Variable_name IN ('wsrep_ready', 'wsrep_local_state')",
    { type: QueryTypes.SELECT },
  )
  const get = (name: string) => status.find((r) => r.Variable_name.toLowerCase() === name)?.Value
  return get('wsrep_ready') === 'ON' && get('wsrep_local_state') === WSREP_SYNCED ? 'synced' : 'not-synced'
}

async function migrationsCurrent(sequelize: Sequelize): Promise<boolean> {
  const applied = await sequelize.query<{ name: string }>('SELECT name FROM schema_migrations', { type: QueryTypes.SELECT })
  const done = new Set(applied.map((r) => r.name))
  return migrations.every((m) => done.has(m.name))
}

/**
 * Whether this process should receive traffic. A process whose node has left the cluster, or
 * whose schema is older than its code (a deploy in progress), answers 503 so the load balancer
 * sends requests to one that can serve them.
 */
export async function readiness(sequelize: Sequelize): Promise<ReadinessView> {
  let cluster: 'synced' | 'not-synced' | 'standalone'
  try {
    cluster = await withTimeout(clusterState(sequelize))
  } catch {
    return { status: 'not-ready', db: 'down', cluster: 'unknown', migrations: 'unknown', reason: 'database-unreachable' }
  }
  if (cluster === 'not-synced') return { status: 'not-ready', db: 'up', cluster, migrations: 'unknown', reason: 'cluster-node-not-synced' }
  let current: boolean
  try {
    current = await withTimeout(migrationsCurrent(sequelize))
  } catch {
    return { status: 'not-ready', db: 'down', cluster, migrations: 'unknown', reason: 'database-unreachable' }
  }
  if (!current) return { status: 'not-ready', db: 'up', cluster, migrations: 'pending', reason: 'migrations-pending' }
  return { status: 'ready', db: 'up', cluster, migrations: 'current' }
}
