import { finalSql } from '../../models/result'

// Voided and preliminary Hb values do not count in any figure.
const COUNTED = finalSql('h')

/**
 * Each referral's milestones for the referral-period reports (funnel, waiting times), as LEFT
 * JOINs of grouped passes over each table instead of one correlated probe per referral and
 * column. Issue #19: at 25 000 referrals the probes cost MariaDB about three times the CPU of
 * these passes (0.6 s against 0.2 s, measured from /proc on the bench database).
 *   fh: first and last counted Hb (an Hb after the first dose exists exactly when the last Hb is later)
 *   fd: first iron dose given; rx: referrals with a prescription
 *   st: ever cleared, ever operated, first move to clinic (only those moves are read: every referral has
 *       other moves, and a referral with none of these gets no row, which the callers read as 0 / NULL)
 * Aliases: r (referrals) and o (outcomes) come from the caller's FROM.
 */
export const MILESTONE_JOINS = `
LEFT JOIN (SELECT h.referral_id, MIN(h.taken_at) AS first_hb_at, MAX(h.taken_at) AS last_hb_at FROM results h
  WHERE h.analyte = 'hb' AND ${COUNTED} GROUP BY h.referral_id) fh ON fh.referral_id = r.id
LEFT JOIN (SELECT a.referral_id, MIN(a.given_at) AS first_dose_at FROM administrations a GROUP BY a.referral_id) fd ON fd.referral_id = r.id
LEFT JOIN (SELECT DISTINCT rx.referral_id FROM prescriptions rx) rx ON rx.referral_id = r.id
LEFT JOIN (SELECT s.referral_id, MAX(s.to_stage = 'cleared') AS cleared, MAX(s.to_stage = 'operated') AS operated,
    MIN(IF(s.to_stage = 'clinic', s.at, NULL)) AS clinic_at
  FROM stage_transitions s WHERE s.to_stage IN ('cleared', 'operated', 'clinic') GROUP BY s.referral_id) st ON st.referral_id = r.id`

/**
 * MariaDB would otherwise turn each grouped pass back into a probe per referral ("lateral
 * derived", split_materialized), which is the cost this avoids. For this one statement only.
 */
export const WHOLE_PASSES = "SET STATEMENT optimizer_switch = 'split_materialized=off' FOR"
