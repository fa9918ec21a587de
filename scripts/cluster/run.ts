/**
 * npm run cluster: the high-availability topology on this machine (ports 4700-4799), with the
 * demo data, until Ctrl-C. Data is kept in .cluster-data/ between runs.
 */
import path from 'node:path'
import { spawnSync } from 'node:child_process'
import { repoRoot, intFromEnv } from '../lib/stack'
import { startTopology, type Topology } from './topology'
import { nodeLabel } from './galera'
import { DEMO_PASSWORD, DEMO_ACCOUNTS } from '../../seed/demo/staff'

async function main(): Promise<void> {
  console.log('[cluster] building the client...')
  const built = spawnSync(path.join(repoRoot, 'node_modules/.bin/vite'), ['build', '--logLevel', 'warn'], {
    cwd: repoRoot,
    stdio: 'inherit',
    env: { ...process.env, NODE_ENV: 'production' },
  })
  if (built.status !== 0) throw new Error('the client build failed')
  let topo: Topology | null = null
  let stopping = false
  const stopAll = async (why: string) => {
    if (stopping) return
    stopping = true
    console.log(`\n[cluster] ${why}: stopping the apps, HAProxy, maildev and the three nodes...`)
    await topo?.stop()
    console.log('[cluster] stopped; data kept in .cluster-data/')
    process.exit(0)
  }
  process.on('SIGINT', () => void stopAll('SIGINT'))
  process.on('SIGTERM', () => void stopAll('SIGTERM'))
  try {
    topo = await startTopology({
      label: 'cluster',
      base: intFromEnv('CLUSTER_PORT_BASE', 4700),
      dataRoot: path.resolve(repoRoot, process.env.CLUSTER_DATA_DIR || '.cluster-data'),
      fresh: false,
      seedDemo: true,
      staticDir: 'dist',
    })
  } catch (err) {
    console.error('[cluster] failed:', err instanceof Error ? err.message : err)
    process.exit(1)
  }
  const p = topo.ports
  console.log(`
  Ferrolane (load-balanced)  ${topo.frontUrl}
  Ferrolane processes        ${p.apps.map((port) => `http://127.0.0.1:${port}`).join('  ')}
  Database writer route      127.0.0.1:${p.dbWriter}   (HAProxy; one synced node at a time)
  Galera nodes               ${p.nodes.map((n, i) => `${nodeLabel(i)} 127.0.0.1:${n.client} (check http://127.0.0.1:${n.check}/)`).join('\n                             ')}
  HAProxy statistics         http://127.0.0.1:${p.stats}/
  maildev                    http://127.0.0.1:${p.mailWeb}   (every e-mail the apps send lands here)
  Demo sign-ins  (password for all: ${DEMO_PASSWORD}; invented demo data)
${DEMO_ACCOUNTS.map((a) => `    ${a.role.padEnd(8)} ${a.email}`).join('\n')}
  Ctrl-C stops everything.
`)
}

void main()
