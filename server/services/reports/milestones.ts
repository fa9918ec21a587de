/**
 * Each referral's milestones for the referral-period reports (funnel, waiting times): one primary-key read per
 * referral of the pre-aggregate `referral_milestones` (migration 0027; milestonesSql.ts says what each column
 * holds and how it is computed from the raw rows). Issue #19: it replaces LEFT JOINs of grouped passes over
 * results, administrations, prescriptions and stage_transitions, and the join to outcomes (its surgery date is
 * in the row): on the bench database (25 000 referrals) MariaDB's CPU per funnel went from about 100 to about
 * 40 ms. A referral with no milestone has no row, so every column reads NULL: the callers take that as "none"
 * (COALESCE to 0 for the flags), as they took the missing rows of the grouped passes.
 * Alias m; r (referrals) comes from the caller's FROM.
 */
export const MILESTONE_JOIN = `
LEFT JOIN referral_milestones m ON m.referral_id = r.id`
