/**
 * HL7 v2 over MLLP at volume: 10 000 ORU^R01 messages over 4 connections to a real server
 * process, each answered before the next on its connection. Reports messages per second, the
 * p95 time from send to ACK, and whether every message was stored exactly once (one
 * hl7_messages row per control id, one result per AA). Control ids and draw times are new each
 * run, so runs never meet each other's duplicates.
 */
import mariadb from 'mariadb'
import { Hl7Message } from '@medplum/core'
import { Hl7Client } from '@medplum/hl7'
import { BENCH_SIZE } from './benchData'
import { cpuMs, memoryMb, startBenchServer } from './server'

const MESSAGES = 10_000
const CONNECTIONS = 4
const TARGET_PER_SECOND = 300
const MLLP_PORT = 2599

const ts = (ms: number) => new Date(ms).toISOString().replace(/[-:T]/g, '').slice(0, 14) + '+0000'

function message(run: string, i: number, base: number): string {
  const mrn = `BN${String((i * 7919) % BENCH_SIZE.patients).padStart(7, '0')}`
  const at = ts(base + i * 1000)
  return [
    `MSH|^~\\&|BENCHLAB|BENCH-PATH|FERROLANE|KVH|${ts(Date.now())}||ORU^R01^ORU_R01|${run}-${i}|P|2.5.1`,
    `PID|1||${mrn}^^^KVH^MR`,
    `OBR|1|${run}-${i}||FBC|||${at}`,
    `OBX|1|NM|718-7^Hemoglobin^LN||${90 + (i % 70)}|g/L^^UCUM|||||F|||${at}`,
  ].join('\r')
}

export async function benchHl7(env: NodeJS.ProcessEnv) {
  const server = await startBenchServer({ ...env, HL7_MLLP_ENABLED: 'true', HL7_MLLP_PORT: String(MLLP_PORT), HL7_ASSIGNING_AUTHORITY: 'KVH' }, 8098)
  const run = `B${Date.now().toString(36)}`
  const base = Date.now() - 300 * 86_400_000
  const latencies: number[] = []
  const codes: Record<string, number> = {}
  try {
    const cpu0 = cpuMs(server.pid)
    const t0 = performance.now()
    await Promise.all(Array.from({ length: CONNECTIONS }, async (_, c) => {
      const client = new Hl7Client({ host: '127.0.0.1', port: MLLP_PORT })
      try {
        for (let i = c; i < MESSAGES; i += CONNECTIONS) {
          const s = performance.now()
          const ack = await client.sendAndWait(Hl7Message.parse(message(run, i, base)), { timeoutMs: 30_000 })
          latencies.push(performance.now() - s)
          const code = ack.getSegment('MSA')?.getComponent(1, 1) ?? '??'
          codes[code] = (codes[code] ?? 0) + 1
        }
      } finally {
        await client.close()
      }
    }))
    const seconds = (performance.now() - t0) / 1000
    const cpu = cpuMs(server.pid) - cpu0
    latencies.sort((a, b) => a - b)
    const conn = await mariadb.createConnection({ host: '127.0.0.1', port: Number(env.DB_PORT), user: env.DB_USER, password: env.DB_PASSWORD, database: env.DB_NAME })
    let stored: { messages: number; distinctControlIds: number; results: number }
    try {
      const [m] = await conn.query(`SELECT COUNT(*) AS n, COUNT(DISTINCT control_id) AS d FROM hl7_messages WHERE control_id LIKE ?`, [`${run}-%`])
      const [r] = await conn.query(`SELECT COUNT(*) AS n FROM results r JOIN hl7_messages h ON h.id = r.hl7_message_id WHERE h.control_id LIKE ? AND r.source = 'hl7'`, [`${run}-%`])
      stored = { messages: Number(m.n), distinctControlIds: Number(m.d), results: Number(r.n) }
    } finally {
      await conn.end()
    }
    const perSecond = Math.round(MESSAGES / seconds)
    const exactlyOnce = stored.messages === MESSAGES && stored.distinctControlIds === MESSAGES && stored.results === (codes.AA ?? 0)
    return {
      bench: 'hl7', messages: MESSAGES, connections: CONNECTIONS, seconds: Math.round(seconds * 10) / 10, perSecond,
      p95AckMs: Math.round(latencies[Math.floor(latencies.length * 0.95)]!), p50AckMs: Math.round(latencies[Math.floor(latencies.length * 0.5)]!),
      acks: codes, stored, serverCpuMsPerMessage: Math.round((cpu / MESSAGES) * 100) / 100, serverRssMb: memoryMb(server.pid).rssMb,
      targets: { minPerSecond: TARGET_PER_SECOND, exactlyOnce: true }, met: perSecond >= TARGET_PER_SECOND && exactlyOnce,
    }
  } finally {
    await server.stop()
  }
}
