/**
 * Every port of one cluster on loopback, from one base: `npm run cluster` uses 4700-4799,
 * `npm run test:cluster` 4600-4699, so both can run beside npm start (8080, 3406) and npm test.
 */
export interface ClusterPorts {
  /** Per node (index 0..2): SQL client, Galera group (gmcast), incremental and full state transfer, check agent. */
  nodes: { client: number; group: number; ist: number; sst: number; check: number }[]
  /** HAProxy: the single-writer database route, the app front end, the statistics page. */
  dbWriter: number
  appFront: number
  stats: number
  /** The Ferrolane processes behind the app front end. */
  apps: number[]
  smtp: number
  mailWeb: number
  oidc: number
}

export const NODE_COUNT = 3
export const APP_COUNT = 2

export function clusterPorts(base: number): ClusterPorts {
  return {
    nodes: Array.from({ length: NODE_COUNT }, (_, i) => ({
      client: base + 1 + i,
      group: base + 11 + i,
      ist: base + 21 + i,
      sst: base + 31 + i,
      check: base + 41 + i,
    })),
    dbWriter: base + 50,
    appFront: base + 60,
    stats: base + 69,
    apps: Array.from({ length: APP_COUNT }, (_, i) => base + 61 + i),
    smtp: base + 70,
    mailWeb: base + 71,
    oidc: base + 80,
  }
}
