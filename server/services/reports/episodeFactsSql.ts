import { finalSql } from '../../models/result'

/**
 * Issue #19 point 4: the per-episode pre-aggregate `episode_facts` (migration 0026), one row per referral
 * that has an outcome, holding what the quality report needs from the episode's child tables and its
 * surgery date. It stores VALUES, not verdicts: the report judges anaemia live against the clinic's
 * thresholds (and the patient's sex), so a settings change needs no rebuild. Facts from the referral and
 * procedure rows (iron status, operation, surgeon, antibodies, blood order, expected loss) and the outcome's
 * own answers are read live. The one writer is episodeFacts.ts.
 * Migration 0026 runs REBUILD_SQL as this file has it when the migration runs: a change of the table's
 * columns comes with a new migration that alters the table and rebuilds it, and must keep the columns
 * 0026 creates so that 0026 still runs on a new database.
 */
export const FACT_COLUMNS = [
  'surgery_date',
  'first_hb_at',
  'first_hb_gl',
  'surgery_day_hb_gl',
  'screened_28_days_before',
  'screened_14_45_days_before',
  'iron_before_surgery',
  'iron_prescribed',
  'postponements_for_anaemia',
  'rbc_rows',
  'rbc_units',
  'rbc_single',
  'rbc_reassessed',
  'any_transfusions',
  'information_on_transfusion',
] as const

// Voided and preliminary Hb values count in no figure (finalSql).
const HB = `FROM results h WHERE h.analyte = 'hb' AND h.referral_id = o.referral_id AND ${finalSql('h')}`
const BEFORE_NEXT_DAY = 'DATE_ADD(o.surgery_date, INTERVAL 1 DAY)'

/**
 * The facts of the outcomes matching `outcomeWhere` (an alias o), computed from the raw rows. `txWhere` narrows
 * the grouped transfusion pass (alias t) to the same referrals. The first Hb is the first by (taken_at, id), the
 * surgery-day Hb the last by (taken_at, id) before the day after surgery, as the report has always taken them.
 * The first Hb's time is the first row by taken_at rather than MIN over every Hb of the episode: the same value (NULL
 * without one), and inside a writer's transaction fewer rows read and locked (README, performance notes).
 */
export const FACTS_SELECT = (outcomeWhere: string, txWhere: string) => `
SELECT o.referral_id, o.surgery_date,
  (SELECT h.taken_at ${HB} ORDER BY h.taken_at LIMIT 1) AS first_hb_at,
  (SELECT h.value_canonical ${HB} ORDER BY h.taken_at, h.id LIMIT 1) AS first_hb_gl,
  (SELECT h.value_canonical ${HB} AND h.taken_at < ${BEFORE_NEXT_DAY} ORDER BY h.taken_at DESC, h.id DESC LIMIT 1)
    AS surgery_day_hb_gl,
  EXISTS (SELECT 1 ${HB} AND DATEDIFF(o.surgery_date, h.taken_at) >= 28) AS screened_28_days_before,
  EXISTS (SELECT 1 ${HB} AND h.taken_at >= DATE_SUB(o.surgery_date, INTERVAL 45 DAY)
    AND h.taken_at < DATE_SUB(o.surgery_date, INTERVAL 13 DAY)) AS screened_14_45_days_before,
  EXISTS (SELECT 1 FROM administrations a WHERE a.referral_id = o.referral_id AND a.given_at < ${BEFORE_NEXT_DAY})
    AS iron_before_surgery,
  EXISTS (SELECT 1 FROM prescriptions rx WHERE rx.referral_id = o.referral_id) AS iron_prescribed,
  (SELECT COUNT(*) FROM surgery_date_changes c WHERE c.referral_id = o.referral_id AND c.reason = 'anaemia')
    AS postponements_for_anaemia,
  COALESCE(tx.rbcRows, 0), COALESCE(tx.rbcUnits, 0), COALESCE(tx.rbcSingle, 0), COALESCE(tx.rbcReassessed, 0),
  COALESCE(tx.anyRows, 0), COALESCE(tx.info, 0)
FROM outcomes o LEFT JOIN (
  SELECT t.referral_id,
    SUM(t.component = 'red-cells') AS rbcRows,
    SUM(IF(t.component = 'red-cells', t.units, 0)) AS rbcUnits,
    SUM(t.component = 'red-cells' AND t.units = 1) AS rbcSingle,
    SUM(t.component = 'red-cells' AND t.units = 1 AND t.reassessed_before_next = 1 AND t.post_transfusion_hb_gl IS NOT NULL)
      AS rbcReassessed,
    COUNT(*) AS anyRows, MAX(t.information_given) AS info
  FROM transfusions t WHERE t.voided_at IS NULL AND ${txWhere} GROUP BY t.referral_id
) tx ON tx.referral_id = o.referral_id
WHERE ${outcomeWhere}`

const COLUMNS = `referral_id, ${FACT_COLUMNS.join(', ')}`

/** Writes the facts of the given referrals (:ids), new or changed. */
export const UPSERT_SQL = `INSERT INTO episode_facts (${COLUMNS})
${FACTS_SELECT('o.referral_id IN (:ids)', 't.referral_id IN (:ids)')}
ON DUPLICATE KEY UPDATE ${FACT_COLUMNS.map((c) => `${c} = VALUES(${c})`).join(', ')}`

/**
 * Removes the rows of referrals (:ids) that no longer have an outcome. A join, not `NOT EXISTS`: MariaDB ran the
 * correlated form as a read of the whole table for each thousand ids (EXPLAIN: ALL), which in the writer's
 * transaction also locked every row read; the join reads and locks the named rows by primary key.
 */
export const DELETE_SQL = `DELETE f FROM episode_facts f LEFT JOIN outcomes o ON o.referral_id = f.referral_id
  WHERE f.referral_id IN (:ids) AND o.referral_id IS NULL`

/** Every row from scratch (the rebuild; the table emptied first). */
export const REBUILD_SQL = `INSERT INTO episode_facts (${COLUMNS})
${FACTS_SELECT('1 = 1', '1 = 1')}`
