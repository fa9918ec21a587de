import { finalSql } from '../../models/result'

// Voided and preliminary Hb values do not count in any figure.
const COUNTED = finalSql('h')

/**
 * Per-episode facts on the surgery day, for the outcome reports: the first (screening) Hb, the
 * last Hb on or before the actual surgery date, whether iron was given before surgery and the
 * product of the first dose. Each is an indexed lookup per episode in the period.
 */
export const SURGERY_DAY_SQL = (where: string) => `
SELECT r.id, r.surgeon_id, r.procedure_id, pt.sex, o.units_transfused_intra_op + o.units_transfused_post_op AS units,
  (SELECT h.value_canonical FROM results h WHERE h.referral_id = r.id AND h.analyte = 'hb' AND ${COUNTED} ORDER BY h.taken_at,
    h.id LIMIT 1) AS first_hb,
  (SELECT h.value_canonical FROM results h WHERE h.referral_id = r.id AND h.analyte = 'hb' AND ${COUNTED} AND h.taken_at <
    DATE_ADD(o.surgery_date, INTERVAL 1 DAY)
     ORDER BY h.taken_at DESC, h.id DESC LIMIT 1) AS surgery_hb,
  (SELECT rx.product_code FROM administrations a JOIN prescriptions rx ON rx.id = a.prescription_id
     WHERE a.referral_id = r.id AND a.given_at < DATE_ADD(o.surgery_date, INTERVAL 1 DAY) ORDER BY a.given_at, a.id LIMIT 1) AS product
FROM outcomes o JOIN referrals r ON r.id = o.referral_id JOIN procedures p ON p.id = r.procedure_id JOIN patients pt ON pt.id = r.patient_id
WHERE ${where}`
