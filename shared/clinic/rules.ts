/**
 * The decision rules behind the readiness verdict and the blood order, as data. Each carries
 * the words a clinician reads on screen (`basis`: a checked citation, or "local policy") and,
 * in the comment, where the number honestly comes from.
 */

/**
 * Oldest Hb that still counts as evidence for the verdict. Default 90 days (ClinicSettings
 * resultMaxAgeDays, admin-editable). The Australian NBA PBM Module 2 pre-operative template
 * asks for work-up results no older than 3 months (secondary source only, clinical reference
 * §11), so the screen says local policy.
 */
export const RESULT_AGE_BASIS = "local policy (results no older than the clinic's stated limit)"

/**
 * A re-check counts once it is at least this many days after the last dose: a rise needs
 * about 10–14 days to show (common practice, clinical reference §11).
 */
export const RECHECK_MIN_DAYS_AFTER_DOSE = 14

/**
 * Non-response: less than 10 g/L rise by 4 weeks after IV iron (common practice; no primary
 * source was found with the search tool — secondary summaries give 10–20 g/L over 2–4 weeks as
 * the usual response, and the BSG 2021 guideline (Snook et al., Gut 2021;70:2030) calls a rise
 * of 10 g/L in 2 weeks a response to oral iron, reference §6). On screen: local policy.
 */
export const NON_RESPONSE = { minRiseGL: 10, afterDays: 28, basis: 'local policy: a rise under 10 g/L by 4 weeks after IV iron' } as const

/**
 * A fall this large below the pre-treatment value is treated as a real fall, not day-to-day
 * variation of the measurement (common practice; smaller changes are within the usual
 * analytical and biological variation of Hb, from memory).
 */
export const FALLING_HB_MARGIN_GL = 5

/** Below this, elective surgery is usually postponed where the operation allows (common practice; local policy on screen). */
export const DEFERRAL_HB_GL = 100

/**
 * Crossmatch when this share or more of patients having the operation are transfused. The T%
 * ≥ 30 % cut-off is commonly quoted for blood ordering schedules (clinical reference §9, from
 * memory), so the screen says local policy.
 */
export const CROSSMATCH_TRANSFUSION_RATE = 0.3

/**
 * For a patient who declines transfusion the optimisation target is raised by this much above
 * the anaemia threshold: there is no blood to fall back on (common practice to aim higher;
 * the figure itself is local policy).
 */
export const DECLINES_TARGET_UPLIFT_GL = 10

export const TXA_BASIS =
  'NICE NG24 (2015) and quality standard QS138 statement 2: offer tranexamic acid to adults having surgery expected to lose ' +
  'more than 500 mL'
export const CELL_SALVAGE_BASIS =
  'NICE NG24 (2015): consider intra-operative cell salvage with tranexamic acid where a very high blood loss is expected'
