/**
 * The whole cluster on loopback, as `npm run cluster` and `npm run test:cluster` run it:
 * three Galera nodes (each with its check agent), maildev, HAProxy (single-writer database
 * route, app front end), the migrations run once through the writer route, and two Ferrolane
 * processes. Each piece can be killed and started again by the test.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { rmSync, mkdirSync, createWriteStream } from 'node:fs'
import path from 'node:path'
import { repoRoot } from '../lib/stack'
import { ensureDatabase } from '../lib/mariadb'
import type { MariaDbHandle } from '../lib/mariadb'
import { startMaildev, type MaildevHandle } from '../lib/maildev'
import { prepareDatabase } from '../lib/prepare'
import { ensureServerBuild } from '../lib/serverBuild'
import { clusterPorts, NODE_COUNT, type ClusterPorts } from './ports'
import { grastate, markSafeToBootstrap, nodeDataDir, nodeLabel, nodePid, nodeSocket, recoverSeqno, startGaleraNode } from './galera'
import { startCheckAgent, type CheckAgent } from './checkAgent'
import { startHaproxy, type HaproxyHandle } from './haproxy'
import { demoClinicEnv } from '../../seed/demo/hospital'

export interface TopologyOptions {
  label: string
  base: number
  dataRoot: string
  fresh: boolean
  seedDemo: boolean
  /** Serve the built client (npm run cluster) or the API only (the test). */
  staticDir: string
  extraEnv?: Record<string, string>
}

export const DB = { name: 'ferrolane', user: 'ferrolane', password: 'ferrolane-cluster-local' }

export interface Topology {
  ports: ClusterPorts
  appEnv: NodeJS.ProcessEnv
  frontUrl: string
  killNode(i: number): void
  startNode(i: number): Promise<void>
  killApp(i: number): void
  /** SIGTERM: the process finishes its requests and its outbox pass, then exits. */
  stopApp(i: number): Promise<void>
  startApp(i: number): Promise<void>
  nodeSocket(i: number): string
  stop(): Promise<void>
}

/**
 * The node to start the cluster from (Galera's rule after a full stop): node1 when new; after a
 * clean stop the one whose grastate.dat says safe_to_bootstrap: 1 (the last to stop); after a
 * crash the most advanced, by the position each node's InnoDB recovers, which is then marked safe.
 */
function bootstrapIndex(root: string, label: string): number {
  const states = Array.from({ length: NODE_COUNT }, (_, i) => grastate(nodeDataDir(root, i)))
  if (states.every((s) => s === null)) return 0
  const safe = states.findIndex((s) => s?.safeToBootstrap)
  if (safe >= 0) return safe
  const seqnos = states.map((s, i) => (s === null ? -1 : s.seqno >= 0 ? s.seqno : recoverSeqno(nodeDataDir(root, i))))
  console.log(`[${label}] no node stopped cleanly last; recovered positions ${seqnos.map((n, i) => `${nodeLabel(i)}=${n}`).join(', ')}`)
  const best = seqnos.indexOf(Math.max(...seqnos))
  markSafeToBootstrap(nodeDataDir(root, best))
  return best
}

export async function waitFor(check: () => Promise<boolean>, timeoutMs: number, what: string): Promise<void> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    if (await check().catch(() => false)) return
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`Timed out after ${timeoutMs} ms waiting for ${what}`)
}

export async function startTopology(opts: TopologyOptions): Promise<Topology> {
  const ports = clusterPorts(opts.base)
  if (opts.fresh) rmSync(opts.dataRoot, { recursive: true, force: true })
  mkdirSync(opts.dataRoot, { recursive: true })
  const spec = (i: number) => ({ index: i, dataDir: nodeDataDir(opts.dataRoot, i), ports })
  const nodes: (MariaDbHandle | null)[] = Array(NODE_COUNT).fill(null)
  const agents: CheckAgent[] = []
  const apps: (ChildProcess | null)[] = ports.apps.map(() => null)
  let maildev: MaildevHandle | null = null
  let haproxy: HaproxyHandle | null = null

  const stopApp = async (i: number) => {
    const a = apps[i]
    if (a && a.exitCode === null && a.signalCode === null) {
      a.kill('SIGTERM')
      await new Promise((r) => a.once('exit', r))
    }
  }
  const stop = async () => {
    await Promise.all(apps.map((_, i) => stopApp(i)))
    await haproxy?.stop().catch(() => {})
    await Promise.all(agents.map((a) => a.stop().catch(() => {})))
    await maildev?.stop().catch(() => {})
    // One at a time, the bootstrap candidate last: the last node to stop is marked safe to start from.
    for (let i = NODE_COUNT - 1; i >= 0; i -= 1) await nodes[i]?.stop().catch((err) => console.error(`[${nodeLabel(i)}] stop:`, err))
  }

  try {
    // The app processes run the compiled server with plain node, as production does.
    ensureServerBuild(opts.label)
    // First, while the machine is quiet: the nodes' state transfers load it heavily.
    maildev = await startMaildev({ smtpPort: ports.smtp, webPort: ports.mailWeb, label: opts.label })
    const first = bootstrapIndex(opts.dataRoot, opts.label)
    console.log(`[${opts.label}] starting the cluster from ${nodeLabel(first)}`)
    nodes[first] = await startGaleraNode(spec(first), true)
    await ensureDatabase(nodes[first]!.socket, DB)
    for (let i = 0; i < NODE_COUNT; i += 1) if (i !== first) nodes[i] = await startGaleraNode(spec(i), false)
    for (let i = 0; i < NODE_COUNT; i += 1) agents.push(await startCheckAgent(ports.nodes[i].check, nodeSocket(spec(i).dataDir)))
    haproxy = await startHaproxy(ports, path.join(opts.dataRoot, 'haproxy'))

    const appEnv: NodeJS.ProcessEnv = {
      ...process.env,
      NODE_ENV: 'production',
      FERROLANE_DEMO: 'true',
      ...demoClinicEnv(process.env),
      HOST: '127.0.0.1',
      DB_HOST: '127.0.0.1',
      DB_PORT: String(ports.dbWriter),
      DB_SOCKET: '',
      DB_NAME: DB.name,
      DB_USER: DB.user,
      DB_PASSWORD: DB.password,
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(ports.smtp),
      SESSION_SECRET: 'ferrolane-cluster-demo-secret-shared-by-every-app-process',
      PUBLIC_URL: `http://127.0.0.1:${ports.appFront}`,
      TRUST_PROXY: '1',
      STATIC_DIR: opts.staticDir,
      UPLOAD_DIR: path.join(opts.dataRoot, 'uploads'),
      HL7_MLLP_ENABLED: 'false',
      ...opts.extraEnv,
    }
    // Once, through the writer route, before any app process starts.
    await waitFor(async () => (await fetch(`http://127.0.0.1:${ports.nodes[first].check}/`)).ok, 30_000, 'the first node to be synced')
    const seeded = await prepareDatabase({ ...appEnv }, { seedDemo: opts.seedDemo })
    console.log(`[${opts.label}] migrated${seeded ? '; loaded the demo scenario (invented data)' : ''}`)

    const logDir = path.join(opts.dataRoot, 'logs')
    mkdirSync(logDir, { recursive: true })
    const startApp = async (i: number) => {
      const log = createWriteStream(path.join(logDir, `app${i + 1}.log`), { flags: 'a' })
      // The compiled server under plain node, as production runs it (no TypeScript loader), through
      // the launcher that sets node's flags; it execs node, so a SIGKILL to this child kills the server.
      const child = spawn('sh', ['scripts/node-server.sh', 'dist-server/server/index.js'], {
        cwd: repoRoot,
        env: { ...appEnv, PORT: String(ports.apps[i]), NODE: process.execPath },
        stdio: ['ignore', 'pipe', 'pipe'],
      })
      child.stdout!.pipe(log)
      child.stderr!.pipe(log)
      apps[i] = child
      await waitFor(async () => (await fetch(`http://127.0.0.1:${ports.apps[i]}/api/health/ready`)).ok, 90_000, `app${i + 1} to be ready`)
    }
    await Promise.all(ports.apps.map((_, i) => startApp(i)))
    const frontUrl = `http://127.0.0.1:${ports.appFront}`
    await waitFor(async () => (await fetch(`${frontUrl}/api/health/ready`)).ok, 30_000, 'the app front end')

    return {
      ports,
      appEnv,
      frontUrl,
      stop,
      killNode: (i) => {
        const pid = nodePid(spec(i).dataDir)
        if (pid) process.kill(pid, 'SIGKILL')
      },
      startNode: async (i) => {
        nodes[i] = await startGaleraNode(spec(i), false)
      },
      killApp: (i) => {
        apps[i]?.kill('SIGKILL')
      },
      stopApp,
      startApp,
      nodeSocket: (i) => nodeSocket(spec(i).dataDir),
    }
  } catch (err) {
    await stop()
    throw err
  }
}
