/**
 * Fills the bench database (never the demo or test one) with an invented service at scale:
 * 20 000 patients, 25 000 referrals, 250 000 results. Bulk inserts through the mariadb driver,
 * so loading takes seconds, not minutes. Kept between runs: it is only loaded when empty.
 */
import mariadb, { type Connection } from 'mariadb'
import { hashPassword, needsRehash } from '../../server/services/passwords'
import { addDays, todayIso, STAGES } from '../../shared/pathway'

export const BENCH_SIZE = { patients: 20_000, referrals: 25_000, resultsPerReferral: 10 }
export const BENCH_PASSWORD = 'bench-password-not-secret'

// A small deterministic PRNG so every bench database is the same.
function prng(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed)
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

async function batch(conn: Connection, sql: string, rows: unknown[][], size = 5000) {
  for (let i = 0; i < rows.length; i += size) await conn.batch(sql, rows.slice(i, i + size))
}

export async function loadBenchData(db: {
  host: string
  port: number
  user: string
  password: string
  database: string
}): Promise<{ loaded: boolean; nurseEmail: string }> {
  const nurseEmail = 'bench.nurse@ferrolane.test'
  const conn = await mariadb.createConnection({ ...db, dateStrings: false })
  try {
    const [{ n }] = await conn.query('SELECT COUNT(*) AS n FROM referrals')
    if (Number(n) >= BENCH_SIZE.referrals) {
      // A database loaded before the password cost changed (issue #19: N=2^17, p=1 to N=2^15, p=3)
      // would make the first run's sign-in verify at the old 128 MiB and rehash: a one-off, not
      // what the bench measures. Its accounts get today's hash here instead.
      const [{ passwordHash }] = await conn.query('SELECT password_hash AS passwordHash FROM users WHERE email = ?', [nurseEmail])
      if (needsRehash(String(passwordHash)))
        await conn.query("UPDATE users SET password_hash = ? WHERE email LIKE 'bench.%@ferrolane.test'", [
          await hashPassword(BENCH_PASSWORD),
        ])
      return { loaded: false, nurseEmail }
    }
    const rand = prng(20261201)
    const now = new Date()
    const today = todayIso()
    const hash = await hashPassword(BENCH_PASSWORD)
    await conn.query('SET FOREIGN_KEY_CHECKS = 0')
    for (const t of ['results', 'stage_transitions', 'referrals', 'patient_measurements', 'patients', 'procedures', 'users'])
      await conn.query(`DELETE FROM ${t}`)
    await conn.query('SET FOREIGN_KEY_CHECKS = 1')

    const staff: unknown[][] = [[nurseEmail, 'Bench Nurse', 'nurse', hash, now, now]]
    for (let i = 1; i <= 20; i++) staff.push([`bench.surgeon${i}@ferrolane.test`, `Bench Surgeon ${i}`, 'surgeon', hash, now, now])
    await batch(conn, 'INSERT INTO users (email, name, role, password_hash, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?)', staff)
    const surgeons = (await conn.query("SELECT id FROM users WHERE role = 'surgeon'")).map((r: { id: number }) => r.id)
    const procs: unknown[][] = []
    for (let i = 1; i <= 12; i++)
      procs.push([`BP${i}`, `Bench operation ${i}`, 'Bench', 200 + i * 120, 0.1, 'group-and-screen', 0, 'bench data', now, now])
    await batch(
      conn,
      'INSERT INTO procedures (code, name, specialty, expected_blood_loss_ml, transfusion_rate, usual_blood_order, usual_units, ' +
        'source, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
      procs,
    )
    const procIds = (await conn.query('SELECT id FROM procedures')).map((r: { id: number }) => r.id)

    const syllables = [
      'ash',
      'bro',
      'cal',
      'den',
      'fer',
      'gor',
      'hal',
      'ive',
      'jun',
      'kes',
      'lor',
      'mar',
      'nor',
      'oak',
      'pen',
      'quil',
      'ros',
      'sel',
      'tor',
      'ven',
    ]
    const name = () => syllables[Math.floor(rand() * 20)]! + syllables[Math.floor(rand() * 20)]!
    const patients: unknown[][] = []
    for (let i = 0; i < BENCH_SIZE.patients; i++) {
      const g = name(),
        f = name()
      patients.push([
        `BN${String(i).padStart(7, '0')}`,
        g[0]!.toUpperCase() + g.slice(1),
        f[0]!.toUpperCase() + f.slice(1),
        addDays(today, -Math.floor(18000 + rand() * 14000)),
        rand() < 0.5 ? 'female' : 'male',
        1,
        now,
        now,
      ])
    }
    await batch(
      conn,
      'INSERT INTO patients (mrn, given_name, family_name, date_of_birth, sex, version, created_at, updated_at) VALUES (?, ?, ' +
        '?, ?, ?, ?, ?, ?)',
      patients,
    )
    const patientIds = (await conn.query('SELECT id FROM patients ORDER BY id')).map((r: { id: number }) => r.id)
    await batch(
      conn,
      'INSERT INTO patient_measurements (patient_id, height_cm, weight_kg, measured_at, created_at) VALUES (?, ?, ?, ?, ?)',
      patientIds.map((id: number) => [id, 150 + Math.round(rand() * 40), 50 + Math.round(rand() * 60), now, now]),
    )

    const referrals: unknown[][] = []
    for (let i = 0; i < BENCH_SIZE.referrals; i++) {
      const hb = rand() < 0.15 ? null : Math.round(85 + rand() * 80)
      const ferritin = rand()
      referrals.push([
        patientIds[i % patientIds.length],
        procIds[Math.floor(rand() * procIds.length)],
        surgeons[Math.floor(rand() * surgeons.length)],
        addDays(today, Math.floor(-60 + rand() * 180)),
        rand() < 0.2 ? 'cancer' : 'routine',
        STAGES[Math.floor(rand() * STAGES.length)],
        1,
        hb === null ? null : hb < 130 ? 1 : 0,
        'surgical',
        hb === null ? null : ferritin < 0.4 ? 'absolute-deficiency' : ferritin < 0.6 ? 'iron-restricted' : 'replete',
        hb,
        hb === null ? null : new Date(now.getTime() - Math.floor(rand() * 40) * 86_400_000),
        rand() < 0.1 ? addDays(today, Math.floor(-20 + rand() * 30)) : null,
        now,
        now,
      ])
    }
    await batch(
      conn,
      `INSERT INTO referrals (patient_id, procedure_id, surgeon_id, planned_surgery_date, priority, stage, version, anaemic,
      anaemia_criteria, iron_status, latest_hb_gl, latest_hb_at, recheck_due_date, created_at, updated_at)
      VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      referrals,
    )
    const refs = await conn.query('SELECT id, patient_id AS patientId FROM referrals')
    const analytes: [string, string, () => number][] = [
      ['hb', 'g/L', () => 90 + rand() * 70],
      ['hb', 'g/L', () => 90 + rand() * 70],
      ['hb', 'g/L', () => 90 + rand() * 70],
      ['hb', 'g/L', () => 90 + rand() * 70],
      ['ferritin', 'µg/L', () => 5 + rand() * 300],
      ['tsat', '%', () => 5 + rand() * 40],
      ['crp', 'mg/L', () => rand() * 40],
      ['creatinine', 'µmol/L', () => 50 + rand() * 100],
      ['mcv', 'fL', () => 70 + rand() * 30],
      ['folate', 'µg/L', () => 2 + rand() * 15],
    ]
    const results: unknown[][] = []
    for (const r of refs as { id: number; patientId: number }[]) {
      analytes.forEach(([a, u, v], k) => {
        const value = Math.round(v() * 10) / 10
        results.push([r.id, r.patientId, a, value, u, value, u, new Date(now.getTime() - (k + 1) * 3 * 86_400_000), 'manual', now])
      })
    }
    await batch(
      conn,
      `INSERT INTO results (referral_id, patient_id, analyte, value_canonical, unit_canonical, value_reported, unit_reported,
                       taken_at, source, created_at)
      VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      results,
      10_000,
    )
    await conn.query('ANALYZE TABLE referrals, patients, results, procedures, users')
    return { loaded: true, nurseEmail }
  } finally {
    await conn.end()
  }
}
