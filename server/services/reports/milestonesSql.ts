import { finalSql } from '../../models/result'

/**
 * Issue #19: the per-referral pre-aggregate `referral_milestones` (migration 0027) that the funnel and the
 * waiting times read, one row per referral that has at least one milestone. VALUES, not verdicts: the reports
 * still decide what counts (anaemic, screened early, each leg's days) from these values and the referral's
 * own columns, which they read live. The one writer is referralMilestones.ts.
 *   first_hb_at, last_hb_at: first and last counted Hb (voided and preliminary Hb count in no figure)
 *   first_dose_at: first iron dose given; prescribed: the referral has a prescription
 *   cleared, operated: ever moved to "Fit for theatre" / "Surgery done"; clinic_at: first move to clinic
 *   surgery_date: the post-operative record's surgery date, NULL exactly when there is no record (the
 *     column is NOT NULL in outcomes), so the reports need no join to outcomes
 * Migration 0027 runs REBUILD_SQL as this file has it when the migration runs: a change of the columns comes
 * with a new migration, and keeps the columns 0027 creates so that 0027 still runs on a new database.
 */
export const MILESTONE_COLUMNS = [
  'first_hb_at',
  'last_hb_at',
  'first_dose_at',
  'prescribed',
  'cleared',
  'operated',
  'clinic_at',
  'surgery_date',
] as const

const HB_COLUMNS = ['first_hb_at', 'last_hb_at'] as const

/**
 * Each referral's milestones from the raw rows, as grouped passes over each table (the shape the reports ran
 * before the pre-aggregate). `idsOf(alias)` narrows every pass and the referrals to the same set: `1 = 1` for
 * the rebuild, an IN list for a refresh. Every referral of the set gets a row, empty where it has no milestone.
 */
type IdsOf = (alias: string, column?: string) => string
const MILESTONES_SELECT = (idsOf: IdsOf) => `
SELECT r.id, fh.first_hb_at, fh.last_hb_at, fd.first_dose_at, rx.referral_id IS NOT NULL AS prescribed,
  COALESCE(st.cleared, 0) AS cleared, COALESCE(st.operated, 0) AS operated, st.clinic_at, o.surgery_date
FROM referrals r LEFT JOIN outcomes o ON o.referral_id = r.id
LEFT JOIN (${HB_PASS(idsOf)}) fh ON fh.referral_id = r.id
LEFT JOIN (SELECT a.referral_id, MIN(a.given_at) AS first_dose_at FROM administrations a WHERE ${idsOf('a')}
  GROUP BY a.referral_id) fd ON fd.referral_id = r.id
LEFT JOIN (SELECT DISTINCT rx.referral_id FROM prescriptions rx WHERE ${idsOf('rx')}) rx ON rx.referral_id = r.id
LEFT JOIN (SELECT s.referral_id, MAX(s.to_stage = 'cleared') AS cleared, MAX(s.to_stage = 'operated') AS operated,
    MIN(IF(s.to_stage = 'clinic', s.at, NULL)) AS clinic_at
  FROM stage_transitions s WHERE s.to_stage IN ('cleared', 'operated', 'clinic') AND ${idsOf('s')}
  GROUP BY s.referral_id) st ON st.referral_id = r.id
WHERE ${idsOf('r', 'id')}`

const HB_PASS = (idsOf: IdsOf) => `SELECT h.referral_id, MIN(h.taken_at) AS first_hb_at,
  MAX(h.taken_at) AS last_hb_at FROM results h WHERE h.analyte = 'hb' AND ${finalSql('h')} AND ${idsOf('h')}
  GROUP BY h.referral_id`

// The referrals a refresh names (:ids); `column` is the referral's id in that table.
const IDS: IdsOf = (alias, column = 'referral_id') => `${alias}.${column} IN (:ids)`
const ALL: IdsOf = () => '1 = 1'

/**
 * MariaDB would otherwise turn each grouped pass into a probe per referral ("lateral derived"); whole passes
 * are what the rebuild wants, and for a refresh of a thousand ids they cost no more (measured on the bench
 * database: 510 against 705 ms of MariaDB CPU for all 25 000 referrals). For that statement only.
 */
const WHOLE_PASSES = "SET STATEMENT optimizer_switch = 'split_materialized=off' FOR"

const upsert = (columns: readonly string[], select: string) => `INSERT INTO referral_milestones (referral_id, ${columns.join(', ')})
${select}
ON DUPLICATE KEY UPDATE ${columns.map((c) => `${c} = VALUES(${c})`).join(', ')}`

/** Writes every milestone of the given referrals (:ids), an empty row where they have none (removed by DELETE_EMPTY_SQL). */
export const UPSERT_SQL = `${WHOLE_PASSES}
${upsert(MILESTONE_COLUMNS, MILESTONES_SELECT(IDS))}`

/**
 * Writes the first and last counted Hb of the given referrals (:ids), for the writers that change results only
 * (typed results, imports and their reversal, HL7): the Hb columns alone are all such a write can move. A
 * referral without a row has no other milestone (the table holds every referral that has one), so a new row's
 * other columns are right as their defaults.
 * Each end is read as the first row of the index (analyte, referral, time) from that end, not as the grouped
 * pass's MIN and MAX over every Hb of the episode: inside an import's transaction each Hb read is a locking
 * read whose index page the import has just written, so InnoDB looks up every such row in the table itself
 * (about 3 pages a row) and locks it; two rows an episode instead of all of them (8 in the bench) took about 45 %
 * off this statement's MariaDB CPU (README, performance notes). Same values: the earliest and latest counted time, NULL
 * without one. The locking read still meets a concurrent writer's new first or last Hb (its row, or the gap
 * lock beside the row read), as the grouped pass did.
 */
const HB_END = (direction: 'ASC' | 'DESC') => `(SELECT h.taken_at FROM results h WHERE h.analyte = 'hb' AND h.referral_id = r.id
    AND ${finalSql('h')} ORDER BY h.taken_at ${direction} LIMIT 1)`
export const UPSERT_HB_SQL = upsert(
  HB_COLUMNS,
  `SELECT r.id, ${HB_END('ASC')} AS first_hb_at, ${HB_END('DESC')} AS last_hb_at
FROM referrals r WHERE r.id IN (:ids)`,
)

/** Removes the rows of referrals (:ids) left with no milestone at all (a voided Hb, a reversed import). */
export const DELETE_EMPTY_SQL = `DELETE FROM referral_milestones WHERE referral_id IN (:ids)
  AND first_hb_at IS NULL AND last_hb_at IS NULL AND first_dose_at IS NULL AND prescribed = 0 AND cleared = 0
  AND operated = 0 AND clinic_at IS NULL AND surgery_date IS NULL`

/** Every row from scratch (the rebuild; the table emptied first), referrals without a milestone left out. */
export const REBUILD_SQL = `${WHOLE_PASSES}
INSERT INTO referral_milestones (referral_id, ${MILESTONE_COLUMNS.join(', ')})
SELECT * FROM (${MILESTONES_SELECT(ALL)}) m
WHERE first_hb_at IS NOT NULL OR first_dose_at IS NOT NULL OR prescribed OR cleared OR operated
  OR clinic_at IS NOT NULL OR surgery_date IS NOT NULL`
