/**
 * HL7 v2 over MLLP at volume: 10 000 ORU^R01 messages over 4 connections to a real server
 * process, each answered before the next on its connection. Reports messages per second, the
 * p95 time from send to ACK, and whether every message was stored exactly once (one
 * hl7_messages row per control id, one result per AA). Control ids and draw times are new each
 * run, so runs never meet each other's duplicates.
 */
import net from 'node:net'
import os from 'node:os'
import mariadb, { type Connection } from 'mariadb'
import { Hl7Message } from '@medplum/core'
import { Hl7Client } from '@medplum/hl7'
import { BENCH_SIZE } from './benchData'
import { cpuMs, memoryMb, startBenchServer } from './server'

const MESSAGES = 10_000
const CONNECTIONS = 4
const TARGET_PER_SECOND = 300
// Messages sent a second time after the run (the first ones of each connection): each must get
// the very ACK it got the first time, and the database must hold nothing more.
const RESENT = 400
// Ports of their own, so a run beside another bench (reports uses 8098) does not meet it.
const MLLP_PORT = Number(process.env.BENCH_MLLP_PORT || 2599)
const HTTP_PORT = Number(process.env.BENCH_HTTP_PORT || 8096)

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

type Db = Connection

/** The server answers HTTP before its MLLP listener is up (the HL7 library loads on first use): wait for the port too. */
async function mllpReady(port: number): Promise<void> {
  for (let i = 0; ; i++) {
    const open = await new Promise<boolean>((resolve) => {
      const s = net.connect(port, '127.0.0.1', () => {
        s.destroy()
        resolve(true)
      })
      s.on('error', () => resolve(false))
    })
    if (open) return
    if (i > 240) throw new Error(`the bench server's MLLP listener did not open port ${port}`)
    await new Promise((r) => setTimeout(r, 250))
  }
}

/** Messages whose patient has an open episode: the AA answers expected, worked out from the data before sending. */
async function expectedStored(conn: Db): Promise<number> {
  const mrns = Array.from({ length: MESSAGES }, (_, i) => `BN${String((i * 7919) % BENCH_SIZE.patients).padStart(7, '0')}`)
  const open = new Set<string>()
  for (let i = 0; i < mrns.length; i += 2000) {
    const rows: { mrn: string }[] = await conn.query(
      `SELECT DISTINCT p.mrn FROM patients p JOIN referrals r ON r.patient_id = p.id WHERE r.stage NOT IN ('closed', ` +
        `'withdrawn') AND p.mrn IN (?)`,
      [mrns.slice(i, i + 2000)],
    )
    rows.forEach((r) => open.add(r.mrn))
  }
  return mrns.filter((m) => open.has(m)).length
}

/**
 * The machine's speed in this run, for comparing runs on a shared machine: sequential
 * `SELECT 1` round trips per second from this process, and the load average.
 */
async function baseline(conn: Db): Promise<{ selectOnePerSecond: number; loadAverage1m: number }> {
  const n = 2000
  const t0 = performance.now()
  for (let i = 0; i < n; i++) await conn.query('SELECT 1')
  return { selectOnePerSecond: Math.round(n / ((performance.now() - t0) / 1000)), loadAverage1m: Math.round(os.loadavg()[0]! * 10) / 10 }
}

/**
 * Statements the database server has been sent so far, by every client (MariaDB's global
 * `Questions` counter): the load-independent cost of a message is the delta over the run.
 */
async function questions(conn: Db): Promise<number> {
  const rows: { Value: string }[] = await conn.query("SHOW GLOBAL STATUS LIKE 'Questions'")
  return Number(rows[0]?.Value ?? 0)
}

/** What the database holds for this run: each count worked out independently of the ACKs. */
async function verify(conn: Db, run: string) {
  const like = `${run}-%`
  const [m] = await conn.query(
    `SELECT COUNT(*) AS n, COUNT(DISTINCT control_id) AS d, SUM(ack_code = 'AA') AS aa FROM hl7_messages WHERE control_id LIKE ?`,
    [like],
  )
  const [r] = await conn.query(
    `SELECT COUNT(*) AS n FROM results r JOIN hl7_messages h ON h.id = r.hl7_message_id WHERE h.control_id LIKE ? AND r.source = 'hl7'`,
    [like],
  )
  // The results' natural key (episode, test, time taken, value) holds no row twice.
  const [dup] = await conn.query(
    `SELECT COUNT(*) AS n FROM (SELECT r.referral_id FROM results r JOIN hl7_messages h ON h.id = r.hl7_message_id WHERE h.control_id LIKE ?
       GROUP BY r.referral_id, r.analyte, r.taken_at, r.value_canonical HAVING COUNT(*) > 1) d`,
    [like],
  )
  // Every stored message brought exactly one result (each bench message has one OBX).
  const [odd] = await conn.query(
    `SELECT COUNT(*) AS n FROM hl7_messages h WHERE h.control_id LIKE ? AND h.ack_code = 'AA' AND (SELECT COUNT(*) FROM results ` +
      `r WHERE r.hl7_message_id = h.id) <> 1`,
    [like],
  )
  return {
    messages: Number(m.n),
    distinctControlIds: Number(m.d),
    storedAA: Number(m.aa),
    results: Number(r.n),
    duplicateResults: Number(dup.n),
    storedMessagesWithoutOneResult: Number(odd.n),
  }
}

/**
 * The first RESENT messages again, over 4 connections at once, after the run: a sender that
 * never saw its ACKs sends them again. Each must get the ACK it got the first time, byte for
 * byte, and nothing new may be stored.
 */
async function resendFirst(run: string, base: number, firstAcks: Map<number, string>, count: () => ReturnType<typeof verify>) {
  const before = await count()
  let sameAcks = 0
  await Promise.all(
    Array.from({ length: CONNECTIONS }, async (_, c) => {
      const client = new Hl7Client({ host: '127.0.0.1', port: MLLP_PORT })
      try {
        for (let i = c; i < RESENT; i += CONNECTIONS) {
          const ack = await client.sendAndWait(Hl7Message.parse(message(run, i, base)), { timeoutMs: 30_000 })
          if (ack.toString() === firstAcks.get(i)) sameAcks += 1
        }
      } finally {
        await client.close()
      }
    }),
  )
  const after = await count()
  return { messages: RESENT, sameAcks, unchanged: JSON.stringify(before) === JSON.stringify(after) }
}

export async function benchHl7(env: NodeJS.ProcessEnv) {
  const db = () =>
    mariadb.createConnection({
      host: '127.0.0.1',
      port: Number(env.DB_PORT),
      user: env.DB_USER,
      password: env.DB_PASSWORD,
      database: env.DB_NAME,
    })
  const pre = await db()
  let expected: number
  let before: Awaited<ReturnType<typeof baseline>>
  try {
    expected = await expectedStored(pre)
    before = await baseline(pre)
  } finally {
    await pre.end()
  }
  const server = await startBenchServer(
    { ...env, HL7_MLLP_ENABLED: 'true', HL7_MLLP_PORT: String(MLLP_PORT), HL7_ASSIGNING_AUTHORITY: 'KVH' },
    HTTP_PORT,
  )
  await mllpReady(MLLP_PORT)
  const run = `B${Date.now().toString(36)}`
  const base = Date.now() - 300 * 86_400_000
  const latencies: number[] = []
  const codes: Record<string, number> = {}
  const firstAcks = new Map<number, string>()
  // The bench's own connection reads the statement counter before and after the sends (2 statements of its own).
  const counter = await db()
  try {
    const q0 = await questions(counter)
    const cpu0 = cpuMs(server.pid)
    const t0 = performance.now()
    await Promise.all(
      Array.from({ length: CONNECTIONS }, async (_, c) => {
        const client = new Hl7Client({ host: '127.0.0.1', port: MLLP_PORT })
        try {
          for (let i = c; i < MESSAGES; i += CONNECTIONS) {
            const s = performance.now()
            const ack = await client.sendAndWait(Hl7Message.parse(message(run, i, base)), { timeoutMs: 30_000 })
            latencies.push(performance.now() - s)
            if (i < RESENT) firstAcks.set(i, ack.toString())
            const code = ack.getSegment('MSA')?.getComponent(1, 1) ?? '??'
            codes[code] = (codes[code] ?? 0) + 1
          }
        } finally {
          await client.close()
        }
      }),
    )
    const seconds = (performance.now() - t0) / 1000
    const cpu = cpuMs(server.pid) - cpu0
    const statements = (await questions(counter)) - q0 - 1
    latencies.sort((a, b) => a - b)
    const conn = await db()
    let stored: Awaited<ReturnType<typeof verify>>
    let after: Awaited<ReturnType<typeof baseline>>
    let resend: Awaited<ReturnType<typeof resendFirst>>
    try {
      stored = await verify(conn, run)
      resend = await resendFirst(run, base, firstAcks, async () => verify(conn, run))
      after = await baseline(conn)
    } finally {
      await conn.end()
    }
    const perSecond = Math.round(MESSAGES / seconds)
    const exactlyOnce =
      stored.messages === MESSAGES &&
      stored.distinctControlIds === MESSAGES &&
      stored.storedAA === expected &&
      (codes.AA ?? 0) === expected &&
      stored.results === expected &&
      stored.duplicateResults === 0 &&
      stored.storedMessagesWithoutOneResult === 0 &&
      resend.sameAcks === RESENT &&
      resend.unchanged
    return {
      bench: 'hl7',
      messages: MESSAGES,
      connections: CONNECTIONS,
      seconds: Math.round(seconds * 10) / 10,
      perSecond,
      p95AckMs: Math.round(latencies[Math.floor(latencies.length * 0.95)]!),
      p50AckMs: Math.round(latencies[Math.floor(latencies.length * 0.5)]!),
      acks: codes,
      expectedAA: expected,
      stored,
      resend,
      serverCpuMsPerMessage: Math.round((cpu / MESSAGES) * 100) / 100,
      // SQL statements the server sent per message (global Questions delta over the sends, the counter's own read taken out).
      statementsPerMessage: Math.round((statements / MESSAGES) * 100) / 100,
      serverRssMb: memoryMb(server.pid).rssMb,
      // Messages per second for every 1000 plain round trips per second the machine managed in this run.
      baseline: {
        before,
        after,
        perSecondPer1000RoundTrips: Math.round((perSecond / ((before.selectOnePerSecond + after.selectOnePerSecond) / 2)) * 1000 * 10) / 10,
      },
      targets: { minPerSecond: TARGET_PER_SECOND, exactlyOnce: true },
      met: perSecond >= TARGET_PER_SECOND && exactlyOnce,
      exactlyOnce,
    }
  } finally {
    await counter.end()
    await server.stop()
  }
}
