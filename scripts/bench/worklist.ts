/**
 * Worklist throughput: GET /api/worklist over HTTP against a real server process (autocannon,
 * 32 connections, 10 s), beside the same pages' SQL issued straight through the mariadb driver.
 */
import autocannon from 'autocannon'
import mariadb from 'mariadb'
import { Sequelize } from 'sequelize'
import { loadConfig } from '../../server/config'
import { createSequelize } from '../../server/db'
import { initModels, User } from '../../server/models/index'
import { worklist } from '../../server/services/worklist'
import type { WorklistQuery } from '../../shared/schemas/referrals'
import { BENCH_PASSWORD } from './benchData'
import { cpuMs, memoryMb, resetPeakMemory, signIn, startBenchServer } from './server'

const CONNECTIONS = 32
const DURATION_S = 10

/** Typical views: the default list, a stage queue, a flag, a date window, a sort by Hb, a name search. */
const VIEWS: { query: string; q: WorklistQuery }[] = [
  { query: '', q: {} },
  { query: 'stage=referred,screened', q: { stage: ['referred', 'screened'] } },
  { query: 'flag=surgery-soon-anaemic', q: { flag: ['surgery-soon-anaemic'] } },
  {
    query: 'stage=clinic,treating,recheck&sort=-plannedSurgeryDate',
    q: { stage: ['clinic', 'treating', 'recheck'], sort: '-plannedSurgeryDate' },
  },
  { query: 'sort=latestHb&page=3', q: { sort: 'latestHb', page: 3 } },
  { query: 'q=ashbro', q: { q: 'ashbro' } },
] as unknown as { query: string; q: WorklistQuery }[]

function percentile(sorted: number[], p: number): number {
  if (!sorted.length) return NaN
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!
}

function summary(latencies: number[], seconds: number) {
  const s = [...latencies].sort((a, b) => a - b)
  return {
    p50Ms: +percentile(s, 50).toFixed(2),
    p95Ms: +percentile(s, 95).toFixed(2),
    rps: Math.round(latencies.length / seconds),
    requests: latencies.length,
  }
}

/** The exact SQL the service issues for each view, captured from Sequelize's log. */
async function capturedSql(env: NodeJS.ProcessEnv, viewerId: number): Promise<Statement[][]> {
  const config = loadConfig(env)
  const seen: Statement[] = []
  const seq: Sequelize = createSequelize(config)
  // Statements sent through Sequelize arrive with their values filled in; those sent straight
  // through the driver (server/services/rawRead.ts) arrive with :name placeholders and rawValues.
  ;(seq as unknown as { options: { logging: (sql: string, o?: { rawValues?: Record<string, unknown> }) => void } }).options.logging = (
    sql,
    o,
  ) => {
    seen.push({ sql: sql.replace(/^Executing \([^)]*\): /, ''), values: o?.rawValues })
  }
  initModels(seq)
  const out: Statement[][] = []
  for (const v of VIEWS) {
    seen.length = 0
    await worklist(seq, { userId: viewerId, role: 'nurse', requestId: null, ip: null }, v.q)
    out.push([...seen])
  }
  await seq.close()
  return out
}

interface Statement {
  sql: string
  values?: Record<string, unknown>
}

/** MariaDB's count of statements received so far (all connections). */
async function questions(env: NodeJS.ProcessEnv): Promise<number> {
  const where = env.DB_SOCKET ? { socketPath: env.DB_SOCKET } : { host: env.DB_HOST, port: Number(env.DB_PORT) }
  const conn = await mariadb.createConnection({ ...where, user: env.DB_USER, password: env.DB_PASSWORD, database: env.DB_NAME })
  try {
    const rows: { Value: string }[] = await conn.query("SHOW GLOBAL STATUS LIKE 'Questions'")
    return Number(rows[0]!.Value)
  } finally {
    await conn.end()
  }
}

async function directSql(env: NodeJS.ProcessEnv, statements: Statement[][]) {
  // The same transport as the server's, so the baseline differs only by the app's own work.
  const where = env.DB_SOCKET ? { socketPath: env.DB_SOCKET } : { host: env.DB_HOST, port: Number(env.DB_PORT) }
  const pool = mariadb.createPool({
    ...where,
    user: env.DB_USER,
    password: env.DB_PASSWORD,
    database: env.DB_NAME,
    connectionLimit: CONNECTIONS,
  })
  const latencies: number[] = []
  const end = Date.now() + DURATION_S * 1000
  let n = 0
  await Promise.all(
    Array.from({ length: CONNECTIONS }, async () => {
      while (Date.now() < end) {
        const page = statements[n++ % statements.length]!
        const t0 = performance.now()
        await Promise.all(
          page.map((st) => (st.values ? pool.query({ sql: st.sql, namedPlaceholders: true }, st.values) : pool.query(st.sql))),
        )
        latencies.push(performance.now() - t0)
      }
    }),
  )
  await pool.end()
  return summary(latencies, DURATION_S)
}

export async function benchWorklist(env: NodeJS.ProcessEnv, nurseEmail: string, databasePid: number) {
  const server = await startBenchServer(env, 8097)
  try {
    const cookie = await signIn(server.url, nurseEmail, BENCH_PASSWORD)
    // Resident memory at rest, signed in, before any load.
    await new Promise((r) => setTimeout(r, 2000))
    const idle = memoryMb(server.pid)
    // The sign-in's one scrypt derivation (32 MiB at N=2^15, r=8) can set the process's peak before
    // any load; `loadPeakMb` is the peak of the load alone, `peakMb` stays the whole run's.
    const loadPeakMeasured = resetPeakMemory(server.pid)
    const latencies: number[] = []
    const instance = autocannon({
      url: server.url,
      connections: CONNECTIONS,
      duration: DURATION_S,
      requests: VIEWS.map((v) => ({ method: 'GET', path: `/api/worklist${v.query ? `?${v.query}` : ''}`, headers: { cookie } })),
    })
    instance.on('response', (_client: unknown, status: number, _bytes: number, ms: number) => {
      if (status === 200) latencies.push(ms)
    })
    // CPU per request does not depend on what else the machine is doing, unlike requests/s; nor do
    // the statements a request sends (MariaDB's global Questions counter, less the reading itself).
    const cpuBefore = { server: cpuMs(server.pid), database: cpuMs(databasePid) }
    const questionsBefore = await questions(env)
    const result = await instance
    const cpuPerRequest = {
      serverMs: +((cpuMs(server.pid) - cpuBefore.server) / latencies.length).toFixed(2),
      databaseMs: +((cpuMs(databasePid) - cpuBefore.database) / latencies.length).toFixed(2),
    }
    const statementsPerRequest = +(((await questions(env)) - questionsBefore - 1) / (latencies.length + result.non2xx)).toFixed(2)
    const http = { ...summary(latencies, DURATION_S), non2xx: result.non2xx, errors: result.errors, cpuPerRequest, statementsPerRequest }
    const afterLoad = memoryMb(server.pid)
    const memory = { rssMb: afterLoad.rssMb, peakMb: Math.max(idle.peakMb, afterLoad.peakMb) }
    const loadPeakMb = loadPeakMeasured ? afterLoad.peakMb : null

    const seq = createSequelize(loadConfig(env))
    initModels(seq)
    const nurse = await User.findOne({ where: { email: nurseEmail } })
    await seq.close()
    const direct = await directSql(env, await capturedSql(env, nurse!.id))
    return {
      bench: 'worklist',
      connections: CONNECTIONS,
      durationS: DURATION_S,
      http,
      directSql: direct,
      p95Ratio: +(http.p95Ms / direct.p95Ms).toFixed(2),
      serverMemory: { idleRssMb: idle.rssMb, ...memory },
      targets: { p95RatioMax: 2, rpsMin: 300, memoryMbMax: 300 },
      met: { p95Ratio: http.p95Ms / direct.p95Ms <= 2, rps: http.rps >= 300, memory: memory.peakMb < 300 },
      // Issue 19's figures, under keys of their own so the ones above stay comparable.
      rpsRatio: +(http.rps / direct.rps).toFixed(2),
      idleMemory: { rssMb: idle.rssMb },
      startPeakMb: idle.peakMb,
      loadPeakMb,
      issue19: {
        targets: { rpsRatioMin: 0.75, p95RatioMax: 1.3, peakMbMax: 200 },
        met: {
          rpsRatio: http.rps / direct.rps >= 0.75,
          p95Ratio: http.p95Ms / direct.p95Ms <= 1.3,
          peakMb: memory.peakMb <= 200,
          loadPeakMb: loadPeakMb !== null && loadPeakMb <= 200,
        },
      },
    }
  } finally {
    await server.stop()
  }
}
