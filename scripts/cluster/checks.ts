/** What the cluster test reads straight from each node, as root over the node's socket. */
import mariadb, { type Connection } from 'mariadb'
import { DB } from './topology'

export async function onNode<T>(socketPath: string, work: (c: Connection) => Promise<T>): Promise<T> {
  const conn = await mariadb.createConnection({ socketPath, user: 'root', database: DB.name, connectTimeout: 5000 })
  try {
    // This session's reads wait until the node has applied everything the cluster committed.
    await conn.query('SET SESSION wsrep_sync_wait = 1')
    return await work(conn)
  } finally {
    await conn.end()
  }
}

export async function countIds(socketPath: string, table: string, ids: number[]): Promise<number> {
  if (!ids.length) return 0
  return onNode(socketPath, async (c) => {
    const rows = (await c.query(`SELECT COUNT(*) AS n FROM \`${table}\` WHERE id IN (?)`, [ids])) as { n: bigint }[]
    return Number(rows[0].n)
  })
}

export async function tableChecksums(socketPath: string): Promise<Record<string, string>> {
  return onNode(socketPath, async (c) => {
    const tables = (await c.query(
      "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE' ORDER BY table_name",
      [DB.name],
    )) as { name: string }[]
    const out: Record<string, string> = {}
    for (const t of tables) {
      const rows = (await c.query(`CHECKSUM TABLE \`${t.name}\``)) as { Checksum: bigint | null }[]
      out[t.name] = String(rows[0].Checksum)
    }
    return out
  })
}
