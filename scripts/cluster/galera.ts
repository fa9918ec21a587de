/**
 * One Galera node on loopback: a private MariaDB (scripts/lib/mariadb.ts) with the wsrep
 * settings, its own data directory and ports. State transfers use rsync, which runs as the
 * user that runs mariadbd; the joiner's data directory must be writable by that user, which
 * holds here because the directory is made by this same user.
 */
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { execFileSync } from 'node:child_process'
import path from 'node:path'
import { findMariaDbd, startMariaDb, mariaDbSocket, type MariaDbHandle } from '../lib/mariadb'
import type { ClusterPorts } from './ports'

export const CLUSTER_NAME = 'ferrolane'

export function galeraLibrary(): string {
  for (const p of ['/usr/lib/galera/libgalera_smm.so', '/usr/lib/libgalera_smm.so', '/usr/lib64/galera-4/libgalera_smm.so']) {
    if (existsSync(p)) return p
  }
  throw new Error("Galera's library was not found: install Debian's galera-4 (apt-get install galera-4)")
}

export interface NodeSpec {
  index: number
  dataDir: string
  ports: ClusterPorts
}

export const nodeLabel = (i: number) => `node${i + 1}`
export const nodeDataDir = (root: string, i: number) => path.join(root, nodeLabel(i))

function wsrepArgs(spec: NodeSpec, bootstrap: boolean): string[] {
  const me = spec.ports.nodes[spec.index]
  const peers = spec.ports.nodes.map((n) => `127.0.0.1:${n.group}`).join(',')
  return [
    '--wsrep-on=ON',
    `--wsrep-provider=${galeraLibrary()}`,
    `--wsrep-cluster-name=${CLUSTER_NAME}`,
    `--wsrep-cluster-address=gcomm://${bootstrap ? '' : peers}`,
    `--wsrep-node-name=${nodeLabel(spec.index)}`,
    '--wsrep-node-address=127.0.0.1',
    `--wsrep-provider-options=gmcast.listen_addr=tcp://127.0.0.1:${me.group};ist.recv_addr=127.0.0.1:${me.ist};gcache.size=64M;` +
      'evs.suspect_timeout=PT3S;evs.inactive_timeout=PT6S;evs.install_timeout=PT6S',
    '--wsrep-sst-method=rsync',
    // A node that rejoins takes its copy from the last standby (rsync blocks the donor's writes
    // while it copies), falling back to any node (the trailing comma).
    `--wsrep-sst-donor=${spec.ports.nodes
      .map((_, i) => i)
      .filter((i) => i !== spec.index)
      .reverse()
      .map(nodeLabel)
      .join(',')},`,
    `--wsrep-sst-receive-address=127.0.0.1:${me.sst}`,
    '--wsrep-slave-threads=2',
    // One writer at a time (HAProxy), so ids stay consecutive as on a single server rather than
    // interleaved per node (Galera's default); the demo loader relies on consecutive ids.
    '--wsrep-auto-increment-control=OFF',
    // Reads wait until this node has applied every write the cluster committed before them, so a
    // request that follows a failover sees what the old writer acknowledged.
    '--wsrep-sync-wait=1',
    // What Galera requires of every node: row-based replication, InnoDB, interleaved auto-increment locks.
    '--binlog-format=ROW',
    '--default-storage-engine=InnoDB',
    '--innodb-autoinc-lock-mode=2',
    // Galera logs row events, so creating a trigger (the audit trail's append-only guard,
    // migration 0014) needs this or SUPER; the app's account has neither otherwise.
    '--log-bin-trust-function-creators=ON',
    '--innodb-buffer-pool-size=128M',
  ]
}

/** The position recorded at a clean shutdown; -1 after a crash. */
export function grastate(dataDir: string): { seqno: number; safeToBootstrap: boolean } | null {
  const file = path.join(dataDir, 'db', 'grastate.dat')
  if (!existsSync(file)) return null
  const text = readFileSync(file, 'utf8')
  return { seqno: Number(/seqno:\s*(-?\d+)/.exec(text)?.[1] ?? -1), safeToBootstrap: /safe_to_bootstrap:\s*1/.test(text) }
}

/**
 * After a crash grastate.dat says seqno -1; the position is then read from InnoDB itself with
 * `mariadbd --wsrep-recover` (which starts InnoDB, logs "Recovered position: UUID:SEQNO" and
 * exits). Returns -1 when it cannot tell.
 */
export function recoverSeqno(dataDir: string): number {
  const log = path.join(dataDir, 'wsrep-recover.log')
  rmSync(log, { force: true })
  try {
    execFileSync(
      findMariaDbd() ?? 'mariadbd',
      [
        '--no-defaults',
        `--datadir=${path.join(dataDir, 'db')}`,
        `--log-error=${log}`,
        '--wsrep-on=ON',
        `--wsrep-provider=${galeraLibrary()}`,
        '--wsrep-recover',
        '--binlog-format=ROW',
        '--innodb-buffer-pool-size=64M',
        '--skip-networking',
        `--socket=${path.join(dataDir, 'recover.sock')}`,
        ...(process.getuid?.() === 0 ? ['--user=root'] : []),
      ],
      { stdio: 'ignore', timeout: 120_000 },
    )
    const found = /Recovered position:\s*[0-9a-f-]+:(-?\d+)/.exec(readFileSync(log, 'utf8'))
    return found ? Number(found[1]) : -1
  } catch {
    return -1
  }
}

/** Marks a node as the one to start the cluster from (after every node stopped). */
export function markSafeToBootstrap(dataDir: string): void {
  const file = path.join(dataDir, 'db', 'grastate.dat')
  if (!existsSync(file)) return
  writeFileSync(file, readFileSync(file, 'utf8').replace(/safe_to_bootstrap:\s*0/, 'safe_to_bootstrap: 1'))
}

/**
 * rsync's SST daemon runs as the server's user, except under root, where rsync drops to
 * `nobody` for the transfer: the joiner's data directory must then be writable by nobody, or the
 * transfer fails with "Permission denied". mariadbd itself (as root) still reads every file.
 */
function letStateTransferWrite(dataDir: string): void {
  if (typeof process.getuid !== 'function' || process.getuid() !== 0) return
  const db = path.join(dataDir, 'db')
  mkdirSync(db, { recursive: true })
  execFileSync('chown', ['-R', 'nobody:', db])
}

export function startGaleraNode(spec: NodeSpec, bootstrap: boolean): Promise<MariaDbHandle> {
  const me = spec.ports.nodes[spec.index]
  return startMariaDb({
    dataDir: spec.dataDir,
    port: me.client,
    label: nodeLabel(spec.index),
    durability: 'full',
    extraArgs: [...wsrepArgs(spec, bootstrap), ...(bootstrap ? ['--wsrep-new-cluster'] : [])],
    readyTimeoutMs: 180_000,
    beforeStart: bootstrap ? undefined : () => letStateTransferWrite(spec.dataDir),
  })
}

export const nodeSocket = (dataDir: string) => mariaDbSocket(dataDir)

export function nodePid(dataDir: string): number | null {
  const file = path.join(dataDir, 'mariadb.pid')
  if (!existsSync(file)) return null
  return Number(readFileSync(file, 'utf8').trim()) || null
}
