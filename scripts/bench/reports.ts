/**
 * Service reports over the bench database (25 000 referrals): each must answer in under 1 s.
 * The operated episodes get their treatment and post-operative records here, in SQL, once.
 */
import mariadb, { type ConnectionConfig } from 'mariadb'
import { hashPassword } from '../../server/services/passwords'
import { BENCH_PASSWORD } from './benchData'
import { signIn, startBenchServer } from './server'

const REPORTS = ['funnel', 'haemoglobin', 'transfusion', 'waiting-times', 'blood-ordering']
const ADMIN = 'bench.admin@ferrolane.test'

async function ensureReportData(db: ConnectionConfig): Promise<void> {
  const conn = await mariadb.createConnection(db)
  try {
    const [{ n }] = await conn.query('SELECT COUNT(*) AS n FROM outcomes')
    if (Number(n) > 0) return
    const now = new Date()
    await conn.query('INSERT IGNORE INTO users (email, name, role, password_hash, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?)',
      [ADMIN, 'Bench Admin', 'admin', await hashPassword(BENCH_PASSWORD), now, now])
    await conn.query(`INSERT INTO stage_transitions (referral_id, from_stage, to_stage, at)
      SELECT id, NULL, 'referred', created_at FROM referrals
      UNION ALL SELECT id, 'screened', 'clinic', DATE_ADD(created_at, INTERVAL 5 DAY) FROM referrals WHERE id % 3 = 0`)
    await conn.query(`INSERT INTO prescriptions (referral_id, product_code, route, weight_kg, hb_gl, target_hb_gl, deficit_mg, total_mg, first_dose_date, plan, cautions, status, prescribed_at)
      SELECT id, 'ferric-carboxymaltose', 'iv', 70, 100, 150, 1000, 1000, DATE(created_at), '{}', '{}', 'completed', created_at FROM referrals WHERE id % 3 = 0`)
    await conn.query(`INSERT INTO administrations (prescription_id, referral_id, dose_mg, given_at, batch_number, reaction, created_at)
      SELECT id, referral_id, 1000, DATE_ADD(prescribed_at, INTERVAL 3 DAY), 'BENCH', 'none', NOW() FROM prescriptions`)
    await conn.query(`INSERT INTO outcomes (referral_id, surgery_date, blood_loss_ml, units_transfused_intra_op, units_transfused_post_op, units_crossmatched,
        lowest_hb_gl, length_of_stay_days, complications, created_at, updated_at)
      SELECT id, planned_surgery_date, 300 + id % 700, id % 5 = 0, id % 7 = 0, IF(id % 4 = 0, 2, 0), 85, 3, '["none"]', NOW(), NOW()
      FROM referrals WHERE stage IN ('operated', 'closed')`)
    await conn.query('ANALYZE TABLE referrals, results, stage_transitions, prescriptions, administrations, outcomes')
  } finally {
    await conn.end()
  }
}

export async function benchReports(env: NodeJS.ProcessEnv) {
  await ensureReportData({ host: env.DB_HOST, port: Number(env.DB_PORT), user: env.DB_USER, password: env.DB_PASSWORD, database: env.DB_NAME })
  const server = await startBenchServer(env, 8098)
  try {
    const cookie = await signIn(server.url, ADMIN, BENCH_PASSWORD)
    const from = new Date(Date.now() - 365 * 86_400_000).toISOString().slice(0, 10)
    const to = new Date(Date.now() + 180 * 86_400_000).toISOString().slice(0, 10)
    const timings: Record<string, { medianMs: number; maxMs: number }> = {}
    for (const name of REPORTS) {
      const url = `${server.url}/api/reports/${name}?from=${from}&to=${to}`
      const first = await fetch(url, { headers: { cookie } }) // warms the buffer pool
      if (!first.ok) throw new Error(`${name}: ${first.status} ${await first.text()}`)
      const ms: number[] = []
      for (let i = 0; i < 5; i++) {
        const t0 = performance.now()
        await (await fetch(url, { headers: { cookie } })).arrayBuffer()
        ms.push(performance.now() - t0)
      }
      ms.sort((a, b) => a - b)
      timings[name] = { medianMs: Math.round(ms[2]!), maxMs: Math.round(ms[4]!) }
    }
    return { bench: 'reports', referrals: 25_000, timings, targetMs: 1000, met: Object.values(timings).every((t) => t.maxMs < 1000) }
  } finally {
    await server.stop()
  }
}
