/**
 * The outbox claim across nodes, head to head: the app processes are stopped, messages are
 * queued, and two workers drain them at once, one connected straight to node2 and one to
 * node3 (not through the writer route), so each claim is decided by Galera's certification.
 */
import { QueryTypes } from 'sequelize'
import { loadConfig } from '../../server/config'
import { createSequelize } from '../../server/db'
import { initModels } from '../../server/models/index'
import { OutboxWorker } from '../../server/services/outboxWorker'
import type { Topology } from './topology'

export async function raceOutboxAcrossNodes(t: Topology, count: number): Promise<{ ok: boolean; detail: string }> {
  await Promise.all(t.ports.apps.map((_, i) => t.stopApp(i)))
  const configs = [1, 2].map((n) => loadConfig({ ...t.appEnv, DB_PORT: String(t.ports.nodes[n].client), DB_SOCKET: '' }))
  const seqs = configs.map((c) => createSequelize(c))
  try {
    initModels(seqs[0])
    const [template] = await seqs[0].query<{ id: number }>(
      "SELECT id FROM outbox_messages WHERE status = 'sent' AND kind = 'booking' ORDER BY id LIMIT 1",
      { type: QueryTypes.SELECT },
    )
    if (!template) return { ok: false, detail: 'no sent booking message to copy' }
    const before = await seqs[0].query<{ m: number | null }>('SELECT MAX(id) AS m FROM outbox_messages', { type: QueryTypes.SELECT })
    for (let i = 0; i < count; i += 1) {
      await seqs[0].query(
        `INSERT INTO outbox_messages (kind, appointment_id, referral_id, patient_id, to_address, subject, payload, status,
         attempts, next_attempt_at, created_at, updated_at)
         SELECT kind, NULL, referral_id, patient_id, to_address, subject, payload, 'queued', 0, NOW(3), NOW(), NOW()
         FROM outbox_messages WHERE id = ?`,
        { replacements: [template.id], type: QueryTypes.INSERT },
      )
    }
    const workers = seqs.map(
      (sequelize, i) => new OutboxWorker({ sequelize, config: configs[i], workerId: `race-node${i + 2}`, batchSize: 5 }),
    )
    // Several passes each, so a worker that lost every claim of one pass keeps competing.
    const runs = await Promise.all(
      workers.map(async (w) => {
        let sent = 0
        for (let pass = 0; pass < 30; pass += 1) sent += (await w.drain()).sent
        return sent
      }),
    )
    await Promise.all(workers.map((w) => w.stop()))
    const rows = await seqs[1].query<{ status: string; n: number }>(
      'SELECT status, COUNT(*) AS n FROM outbox_messages WHERE id > ? GROUP BY status',
      { replacements: [Number(before[0].m ?? 0)], type: QueryTypes.SELECT },
    )
    const sentRows = Number(rows.find((r) => r.status === 'sent')?.n ?? 0)
    const ok = runs[0] + runs[1] === count && sentRows === count
    return { ok, detail: `node2's worker sent ${runs[0]}, node3's ${runs[1]}, ${sentRows} of ${count} rows sent` }
  } finally {
    await Promise.all(seqs.map((s) => s.close()))
  }
}
