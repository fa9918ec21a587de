import { finalSql } from '../../models/result'

// Voided and preliminary Hb values do not count in any figure.
const COUNTED = finalSql('h')

/** The Hb facts as values (the national-audit export prints them): four indexed lookups per episode. */
export const HB_VALUES = `
  (SELECT MIN(h.taken_at) FROM results h WHERE h.referral_id = r.id AND h.analyte = 'hb' AND ${COUNTED}) AS firstHbAt,
  (SELECT h.value_canonical FROM results h WHERE h.referral_id = r.id AND h.analyte = 'hb' AND ${COUNTED} ORDER BY h.taken_at,
    h.id LIMIT 1) AS firstHbGL,
  (SELECT h.value_canonical FROM results h WHERE h.referral_id = r.id AND h.analyte = 'hb' AND ${COUNTED} AND h.taken_at <
    DATE_ADD(o.surgery_date, INTERVAL 1 DAY)
     ORDER BY h.taken_at DESC, h.id DESC LIMIT 1) AS surgeryDayHbGL,
  EXISTS (SELECT 1 FROM results h WHERE h.referral_id = r.id AND h.analyte = 'hb' AND ${COUNTED}
     AND h.taken_at >= DATE_SUB(o.surgery_date, INTERVAL 45 DAY) AND h.taken_at < DATE_SUB(o.surgery_date, INTERVAL 13 DAY)) AS
       screenedInWindow`

/**
 * The Hb facts the quality measures need, as bits of one number (the report's COUNTS read them), judged from
 * the values the pre-aggregate keeps (episode_facts, migration 0026) against `threshold` (strict "<", as
 * screening judges). Bits: 1 first Hb anaemic, 2 an Hb on or before the surgery day, 4 the last of those
 * anaemic, 8 an Hb 28 days or more before surgery, 16 an Hb 14 to 45 days before. 0 without a counted Hb.
 */
const HB_FLAGS = (threshold: string) => `(COALESCE(f.first_hb_gl < ${threshold}, 0) + 2 * (f.surgery_day_hb_gl IS NOT NULL)
    + 4 * COALESCE(f.surgery_day_hb_gl < ${threshold}, 0) + 8 * f.screened_28_days_before + 16 * f.screened_14_45_days_before)
    AS hbFlags`

/**
 * The anaemia threshold of the episode's patient (clinic thresholds :maleGL / :femaleGL). When the clinic's
 * criteria judge both sexes alike (the surgical consensus, the default) it is one constant and the statement
 * reads nothing of the patient: patients is LEFT JOINed on its key (every referral has exactly one), so
 * MariaDB drops the join, one primary-key lookup per episode (issue #19: about 8 % of the statement).
 */
const threshold = (sameForBoth: boolean) => (sameForBoth ? ':maleGL' : "IF(pt.sex = 'male', :maleGL, :femaleGL)")

// Per-episode lookups both readers need (each an indexed probe per episode).
const LOOKUPS = `(r.iron_status IN ('absolute-deficiency', 'iron-restricted')
    OR EXISTS (SELECT 1 FROM prescriptions rx WHERE rx.referral_id = r.id)) AS ironDeficient,
  EXISTS (SELECT 1 FROM administrations a WHERE a.referral_id = r.id AND a.given_at < DATE_ADD(o.surgery_date, INTERVAL 1 DAY))
    AS ironBefore,
  (SELECT COUNT(*) FROM surgery_date_changes c WHERE c.referral_id = r.id AND c.reason = 'anaemia') AS postponementsForAnaemia,
  COALESCE(tx.rbcRows, 0) AS rbcRows, COALESCE(tx.rbcUnits, 0) AS rbcUnits, COALESCE(tx.rbcSingle, 0) AS rbcSingle,
  COALESCE(tx.rbcReassessed, 0) AS rbcReassessed, COALESCE(tx.anyRows, 0) AS anyTransfusions, COALESCE(tx.info, 0) AS infoOnTransfusion`

// The operated episodes with their referral, operation and patient, and the transfusion facts from one grouped pass.
const EPISODES = `FROM outcomes o JOIN referrals r ON r.id = o.referral_id JOIN procedures p ON p.id = r.procedure_id
LEFT JOIN patients pt ON pt.id = r.patient_id
LEFT JOIN (
  SELECT t.referral_id,
    SUM(t.component = 'red-cells') AS rbcRows,
    SUM(IF(t.component = 'red-cells', t.units, 0)) AS rbcUnits,
    SUM(t.component = 'red-cells' AND t.units = 1) AS rbcSingle,
    SUM(t.component = 'red-cells' AND t.units = 1 AND t.reassessed_before_next = 1 AND t.post_transfusion_hb_gl IS NOT NULL) AS
      rbcReassessed,
    SUM(IF(t.component <> 'red-cells', t.units, 0)) AS otherUnits,
    MIN(IF(t.component = 'red-cells', t.pre_transfusion_hb_gl, NULL)) AS lowestPreHbGL,
    COUNT(*) AS anyRows, MAX(t.information_given) AS info
  FROM transfusions t WHERE t.voided_at IS NULL GROUP BY t.referral_id
) tx ON tx.referral_id = r.id`

/**
 * One row per operated episode in the period with every fact the national-audit export prints
 * (row by row).
 */
export const EPISODE_FACTS_SQL = (where: string) => `
SELECT r.id, r.procedure_id AS procedureId, r.surgeon_id AS surgeonId, p.code AS procedureCode, pt.sex, pt.date_of_birth AS dateOfBirth,
  r.created_at AS referredAt, r.listing_date AS listingDate, r.planned_surgery_date AS plannedSurgeryDate, o.surgery_date AS surgeryDate,
  DATE_FORMAT(o.surgery_date, '%Y-%m') AS month,
  p.expected_blood_loss_ml AS expectedLossMl, o.blood_loss_ml AS bloodLossMl, o.units_crossmatched AS unitsCrossmatched,
  o.length_of_stay_days AS lengthOfStayDays,
  (p.expected_blood_loss_ml IS NOT NULL AND p.expected_blood_loss_ml >= :txaLossMl) AS moderateLoss,
  o.tranexamic_acid_given AS txaGiven, o.cell_salvage_used AS cellSalvageUsed, o.cell_salvage_returned_ml AS cellSalvageMl,
  o.transfusion_information_given AS infoOnRecord, o.transfusion_consent AS consent, o.post_operative_iron_given AS postOpIron,
  ${HB_VALUES.trim()},
  ${LOOKUPS},
  COALESCE(tx.otherUnits, 0) AS otherUnits, tx.lowestPreHbGL
${EPISODES}
WHERE ${where}`

/**
 * The same episodes with only what the quality report's grouping reads: the facts from the episode's child
 * tables come from the pre-aggregate f (episode_facts, one primary-key read per episode instead of a set of
 * correlated lookups: issue #19 point 4), the referral's, operation's and outcome's own answers are read live.
 * The blood-order schedule facts are counted here too (qualityExtras.ts counts the cancellations).
 */
export const QUALITY_FACTS_SQL = (where: string, sameThresholdForBoth: boolean) => `
SELECT r.procedure_id AS procedureId, r.surgeon_id AS surgeonId, DATE_FORMAT(o.surgery_date, '%Y-%m') AS month,
  (p.expected_blood_loss_ml IS NOT NULL AND p.expected_blood_loss_ml >= :txaLossMl) AS moderateLoss,
  o.tranexamic_acid_given AS txaGiven, o.transfusion_information_given AS infoOnRecord, o.post_operative_iron_given AS postOpIron,
  (p.usual_blood_order = 'group-and-screen' AND COALESCE(r.red_cell_antibodies, 0) = 0) AS groupAndScreenOnly,
  o.units_crossmatched > 0 AS crossmatched,
  ${HB_FLAGS(threshold(sameThresholdForBoth))},
  (r.iron_status IN ('absolute-deficiency', 'iron-restricted') OR f.iron_prescribed) AS ironDeficient,
  f.iron_before_surgery AS ironBefore, f.postponements_for_anaemia AS postponementsForAnaemia,
  f.rbc_rows AS rbcRows, f.rbc_units AS rbcUnits, f.rbc_single AS rbcSingle, f.rbc_reassessed AS rbcReassessed,
  f.any_transfusions AS anyTransfusions, f.information_on_transfusion AS infoOnTransfusion
FROM outcomes o JOIN episode_facts f ON f.referral_id = o.referral_id JOIN referrals r ON r.id = o.referral_id
  JOIN procedures p ON p.id = r.procedure_id LEFT JOIN patients pt ON pt.id = r.patient_id
WHERE ${where}`

/** Pre-transfusion Hb values of the period's red-cell transfusions, grouped for the median. */
export const PRE_HB_SQL = (where: string) => `
SELECT t.pre_transfusion_hb_gl AS value, COUNT(*) AS n
FROM transfusions t JOIN outcomes o ON o.referral_id = t.referral_id JOIN referrals r ON r.id = o.referral_id JOIN procedures p
  ON p.id = r.procedure_id
WHERE ${where} AND t.voided_at IS NULL AND t.component = 'red-cells' AND t.pre_transfusion_hb_gl IS NOT NULL
GROUP BY t.pre_transfusion_hb_gl`
