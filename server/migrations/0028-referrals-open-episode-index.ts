import type { QueryInterface } from 'sequelize'

/**
 * Issue #19, the 100 000-row import commit: an import's patient match asks, for each MRN of a chunk, for
 * the patient's newest open episode (`MAX(id)` of the referrals whose stage is not closed or withdrawn,
 * imports/match.ts). Through `referrals_patient_id` every referral of the patient was read as a full row
 * to check its stage; with the stage in the index (and the id, which InnoDB keeps in every secondary
 * index) the look-up never leaves it. On the bench database, 100 chunks of 990 MRNs: 844 000 → 597 000
 * buffer-pool page reads, 0.62–0.76 → 0.51–0.55 s of MariaDB CPU (three runs each, load 2.8); a preview runs the same match (README,
 * performance notes). `referrals_patient_id` stays, so no other reader's plan has to change; a referral's
 * insert or stage change updates one more small index.
 */
const NAME = 'referrals_patient_id_stage'

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addIndex('referrals', ['patient_id', 'stage'], { name: NAME })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeIndex('referrals', NAME)
}
