/**
 * The HTTP check HAProxy asks about one Galera node: 200 when the node is ready
 * (wsrep_ready=ON) and synced (wsrep_local_state=4), 503 otherwise or when it does not
 * answer within a second. A plain TCP or MySQL-protocol check would pass a node that is up but
 * out of the primary component, a donor or a joiner, which refuses or lags on queries.
 * Run it beside each database node (in production as its own service, reaching the node by its
 * socket as a user with no privileges beyond USAGE); the cluster scripts run it in-process.
 */
import http from 'node:http'
import mariadb, { type Connection } from 'mariadb'

export interface CheckAgent {
  port: number
  stop(): Promise<void>
}

export async function nodeIsSynced(socketPath: string, user = 'root', password = ''): Promise<{ synced: boolean; detail: string }> {
  let conn: Connection | undefined
  try {
    conn = await mariadb.createConnection({ socketPath, user, password, connectTimeout: 1000, queryTimeout: 1000 })
    const rows = (await conn.query(
      "SHOW GLOBAL STATUS WHERE Variable_name IN ('wsrep_ready', 'wsrep_local_state', 'wsrep_cluster_status')",
    )) as { Variable_name: string; Value: string }[]
    const v = Object.fromEntries(rows.map((r) => [r.Variable_name, r.Value]))
    const synced = v.wsrep_ready === 'ON' && v.wsrep_local_state === '4' && v.wsrep_cluster_status === 'Primary'
    return { synced, detail: `ready=${v.wsrep_ready} state=${v.wsrep_local_state} component=${v.wsrep_cluster_status}` }
  } catch (err) {
    return { synced: false, detail: `no answer (${(err as Error).message.split('\n')[0]})` }
  } finally {
    await conn?.end().catch(() => {})
  }
}

export function startCheckAgent(port: number, socketPath: string, user = 'root', password = '', host = '127.0.0.1'): Promise<CheckAgent> {
  const server = http.createServer((_req, res) => {
    void nodeIsSynced(socketPath, user, password).then(({ synced, detail }) => {
      res.writeHead(synced ? 200 : 503, { 'Content-Type': 'text/plain', Connection: 'close' })
      res.end(`${synced ? 'synced' : 'not synced'}: ${detail}\n`)
    })
  })
  return new Promise((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, host, () =>
      resolve({
        port,
        stop: () =>
          new Promise<void>((r) => {
            server.closeAllConnections()
            server.close(() => r())
          }),
      }),
    )
  })
}

/**
 * On a database server: CHECK_PORT=9200 NODE_SOCKET=/run/mysqld/mysqld.sock CHECK_USER=... \
 * CHECK_PASSWORD=... CHECK_HOST=10.0.0.11 node dist-server/scripts/cluster/checkAgent.js
 * (compiled by npm run build; deploy/systemd/ferrolane-galera-check.service runs it)
 */
if (process.argv[1] && import.meta.filename === process.argv[1]) {
  const port = Number(process.env.CHECK_PORT || 9200)
  const socket = process.env.NODE_SOCKET || '/run/mysqld/mysqld.sock'
  void startCheckAgent(
    port,
    socket,
    process.env.CHECK_USER || 'root',
    process.env.CHECK_PASSWORD || '',
    process.env.CHECK_HOST || '127.0.0.1',
  ).then(() => console.log(`Galera check agent on ${process.env.CHECK_HOST || '127.0.0.1'}:${port} for ${socket}`))
}
