import { QueryTypes, type QueryInterface } from 'sequelize'

/** Each milestone computed from scratch for one episode (`id` = the referral's id expression). */
// Voided and preliminary values are not results yet (finalSql in server/models/result.ts).
const COUNTED_HB = `h.analyte = 'hb' AND h.voided_at IS NULL AND h.status <> 'preliminary'`
const HB = (id: string) => ({
  first_hb_at: `(SELECT MIN(h.taken_at) FROM results h WHERE h.referral_id = ${id} AND ${COUNTED_HB})`,
  last_hb_at: `(SELECT MAX(h.taken_at) FROM results h WHERE h.referral_id = ${id} AND ${COUNTED_HB})`,
})
const DOSE = (id: string) => ({ first_dose_at: `(SELECT MIN(a.given_at) FROM administrations a WHERE a.referral_id = ${id})` })
const MOVES = (id: string) => ({
  clinic_at: `(SELECT MIN(st.at) FROM stage_transitions st WHERE st.referral_id = ${id} AND st.to_stage = 'clinic')`,
  cleared: `EXISTS (SELECT 1 FROM stage_transitions st WHERE st.referral_id = ${id} AND st.to_stage = 'cleared')`,
  operated: `EXISTS (SELECT 1 FROM stage_transitions st WHERE st.referral_id = ${id} AND st.to_stage = 'operated')`,
})
const RX = (id: string) => ({ prescribed: `EXISTS (SELECT 1 FROM prescriptions rx WHERE rx.referral_id = ${id})` })

const ALL = (id: string) => ({ ...HB(id), ...DOSE(id), ...MOVES(id), ...RX(id) })
const COLUMNS = Object.keys(ALL('r.id'))

/**
 * The whole table from scratch, for every episode that has any milestone: what the migration
 * fills it with, and what the test compares the trigger-kept table against.
 */
export const MILESTONES_FROM_SCRATCH_SQL = `SELECT r.id AS referral_id, ${Object.entries(ALL('r.id')).map(([k, v]) => `${v} AS ${k}`).join(', ')}
  FROM referrals r
  WHERE EXISTS (SELECT 1 FROM results h WHERE h.referral_id = r.id AND ${COUNTED_HB}) OR EXISTS (SELECT 1 FROM administrations a WHERE a.referral_id = r.id)
    OR EXISTS (SELECT 1 FROM stage_transitions st WHERE st.referral_id = r.id AND st.to_stage IN ('clinic', 'cleared', 'operated'))
    OR EXISTS (SELECT 1 FROM prescriptions rx WHERE rx.referral_id = r.id)`

/** Re-reads one group of milestones for one episode, creating its row when `create` is set. */
function refresh(cols: Record<string, string>, id: string, create: boolean): string {
  const set = Object.entries(cols).map(([k, v]) => `${k} = ${v}`).join(', ')
  if (!create) return `UPDATE referral_milestones SET ${set} WHERE referral_id = ${id};`
  return `INSERT INTO referral_milestones (referral_id, ${Object.keys(cols).join(', ')}) VALUES (${id}, ${Object.values(cols).join(', ')})
    ON DUPLICATE KEY UPDATE ${Object.keys(cols).map((k) => `${k} = VALUES(${k})`).join(', ')};`
}

interface Trigger { name: string; sql: string }

/**
 * Insert, update and delete triggers on each source table. A delete only updates an existing
 * row (emptying a table with foreign-key checks off must not leave rows behind); an update
 * re-reads both the old and the new episode. A new Hb, the hot path of a laboratory import,
 * moves the two dates without re-reading the table.
 */
function triggersFor(table: string, short: string, cols: (id: string) => Record<string, string>, when: (row: 'NEW' | 'OLD') => string): Trigger[] {
  const name = (event: string) => `${short}_milestones_${event}`
  const body = (stmts: string[]) => `BEGIN ${stmts.join(' ')} END`
  return [
    { name: name('insert'), sql: `CREATE TRIGGER ${name('insert')} AFTER INSERT ON ${table} FOR EACH ROW ${body([`IF ${when('NEW')} THEN`, refresh(cols('NEW.referral_id'), 'NEW.referral_id', true), 'END IF;'])}` },
    { name: name('update'), sql: `CREATE TRIGGER ${name('update')} AFTER UPDATE ON ${table} FOR EACH ROW ${body([`IF ${when('OLD')} OR ${when('NEW')} THEN`, refresh(cols('OLD.referral_id'), 'OLD.referral_id', false), refresh(cols('NEW.referral_id'), 'NEW.referral_id', true), 'END IF;'])}` },
    { name: name('delete'), sql: `CREATE TRIGGER ${name('delete')} AFTER DELETE ON ${table} FOR EACH ROW ${body([`IF ${when('OLD')} THEN`, refresh(cols('OLD.referral_id'), 'OLD.referral_id', false), 'END IF;'])}` },
  ]
}

const HB_INSERT: Trigger = {
  name: 'results_milestones_insert',
  sql: `CREATE TRIGGER results_milestones_insert AFTER INSERT ON results FOR EACH ROW BEGIN IF NEW.analyte = 'hb' AND NEW.voided_at IS NULL AND NEW.status <> 'preliminary' THEN
    INSERT INTO referral_milestones (referral_id, first_hb_at, last_hb_at) VALUES (NEW.referral_id, NEW.taken_at, NEW.taken_at)
    ON DUPLICATE KEY UPDATE first_hb_at = LEAST(COALESCE(first_hb_at, NEW.taken_at), NEW.taken_at), last_hb_at = GREATEST(COALESCE(last_hb_at, NEW.taken_at), NEW.taken_at);
  END IF; END`,
}

const TRIGGERS: Trigger[] = [
  HB_INSERT,
  ...triggersFor('results', 'results', HB, (row) => `${row}.analyte = 'hb'`).filter((t) => !t.name.endsWith('_insert')),
  ...triggersFor('administrations', 'administrations', DOSE, () => 'TRUE'),
  ...triggersFor('stage_transitions', 'stage_transitions', MOVES, (row) => `${row}.to_stage IN ('clinic', 'cleared', 'operated')`),
  ...triggersFor('prescriptions', 'prescriptions', RX, () => 'TRUE'),
]

/**
 * Each episode's milestones in one row (issue 19): first and last Hb, first iron dose given,
 * first move to clinic, ever cleared, ever operated, ever prescribed. The service reports read
 * them by primary key instead of probing four tables per episode.
 *
 * Database triggers keep the row up to date in the same transaction as the change, whoever
 * writes (a service, an import, HL7, a hand-run statement), so no write path can forget it.
 * MILESTONES_FROM_SCRATCH_SQL computes the same table from scratch; the migration fills it that way
 * and a test compares the two after every kind of write.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.sequelize.query(`CREATE TABLE referral_milestones (
    referral_id INT UNSIGNED NOT NULL PRIMARY KEY,
    first_hb_at DATETIME NULL,
    last_hb_at DATETIME NULL,
    first_dose_at DATETIME NULL,
    clinic_at DATETIME(3) NULL,
    cleared TINYINT(1) NOT NULL DEFAULT 0,
    operated TINYINT(1) NOT NULL DEFAULT 0,
    prescribed TINYINT(1) NOT NULL DEFAULT 0,
    CONSTRAINT referral_milestones_referral FOREIGN KEY (referral_id) REFERENCES referrals (id) ON DELETE CASCADE ON UPDATE CASCADE
  ) ENGINE=InnoDB`, { type: QueryTypes.RAW })
  for (const trigger of TRIGGERS) await qi.sequelize.query(trigger.sql, { type: QueryTypes.RAW })
  await qi.sequelize.query(`INSERT INTO referral_milestones (referral_id, ${COLUMNS.join(', ')}) ${MILESTONES_FROM_SCRATCH_SQL}`, { type: QueryTypes.RAW })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const trigger of TRIGGERS) await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${trigger.name}`, { type: QueryTypes.RAW })
  await qi.dropTable('referral_milestones')
}
