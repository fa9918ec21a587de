/**
 * HAProxy in front of the cluster, two listeners:
 * - the database route (TCP): ONE writer at a time. Every node is health-checked over HTTP by
 *   its check agent (synced or not); the first healthy node takes all connections, the others
 *   are backups. A one-entry stick table keeps the route on the current writer even after the
 *   old one comes back, so there is never a second writer from a fail-back, and connections to
 *   a node marked down are cut so the app reconnects to the new writer at once.
 * - the app front end (HTTP): round robin over the Ferrolane processes, each checked on
 *   /api/health/ready; a request whose connection could not be made is tried on the other.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync, writeFileSync, mkdirSync } from 'node:fs'
import path from 'node:path'
import type { ClusterPorts } from './ports'

export function haproxyConfig(ports: ClusterPorts): string {
  const nodes = ports.nodes
    .map((n, i) => `  server node${i + 1} 127.0.0.1:${n.client} check port ${n.check}${i === 0 ? '' : ' backup'}`)
    .join('\n')
  const apps = ports.apps.map((p, i) => `  server app${i + 1} 127.0.0.1:${p} check`).join('\n')
  return `# Written by Ferrolane's cluster scripts; see the README, "Running on a cluster".
global
  maxconn 2000

defaults
  timeout connect 3s
  timeout client 60s
  timeout server 60s
  timeout check 2s

listen stats
  mode http
  bind 127.0.0.1:${ports.stats}
  stats enable
  stats uri /
  stats refresh 2s

listen galera_writer
  mode tcp
  bind 127.0.0.1:${ports.dbWriter}
  option redispatch
  retries 3
  option httpchk GET /
  http-check expect status 200
  default-server inter 1s fall 2 rise 3 on-marked-down shutdown-sessions
  stick-table type integer size 1 expire 7d
  stick on int(1)
${nodes}

frontend ferrolane_front
  mode http
  bind 127.0.0.1:${ports.appFront}
  option forwardfor
  default_backend ferrolane_apps

backend ferrolane_apps
  mode http
  balance roundrobin
  option httpchk GET /api/health/ready
  http-check expect status 200
  default-server inter 1s fall 2 rise 2 on-marked-down shutdown-sessions
  option redispatch
  retries 3
  retry-on conn-failure
${apps}
`
}

export interface HaproxyHandle {
  child: ChildProcess
  stop(): Promise<void>
}

export function haproxyBinary(): string {
  return ['/usr/sbin/haproxy', '/usr/bin/haproxy', '/usr/local/sbin/haproxy'].find((p) => existsSync(p)) ?? 'haproxy'
}

export async function startHaproxy(ports: ClusterPorts, dir: string): Promise<HaproxyHandle> {
  mkdirSync(dir, { recursive: true })
  const cfg = path.join(dir, 'haproxy.cfg')
  writeFileSync(cfg, haproxyConfig(ports))
  const child = spawn(haproxyBinary(), ['-f', cfg, '-db'], { stdio: ['ignore', 'ignore', 'pipe'], detached: true })
  child.stderr?.on('data', (d: Buffer) => {
    const text = d.toString().trim()
    if (text) console.log(`[haproxy] ${text.split('\n').join('\n[haproxy] ')}`)
  })
  await new Promise((r) => setTimeout(r, 500))
  if (child.exitCode !== null) throw new Error(`haproxy exited at start (${child.exitCode}); config in ${cfg}`)
  return {
    child,
    stop: async () => {
      if (child.exitCode !== null) return
      child.kill('SIGTERM')
      await new Promise((r) => child.once('exit', r))
    },
  }
}
