import { DataTypes, type QueryInterface } from 'sequelize'

const userRef = {
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: true,
  references: { model: 'users', key: 'id' },
  onDelete: 'SET NULL',
  onUpdate: 'CASCADE',
}

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('outcomes', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      unique: true,
      references: { model: 'referrals', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    surgery_date: { type: DataTypes.DATEONLY, allowNull: false },
    blood_loss_ml: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    units_transfused_intra_op: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    units_transfused_post_op: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    units_crossmatched: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    lowest_hb_gl: { type: DataTypes.DOUBLE, allowNull: false },
    discharge_hb_gl: { type: DataTypes.DOUBLE, allowNull: true },
    length_of_stay_days: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
    complications: { type: DataTypes.JSON, allowNull: false },
    recorded_by: userRef,
    follow_up_recheck_hb_gl: { type: DataTypes.DOUBLE, allowNull: true },
    follow_up_recheck_date: { type: DataTypes.DATEONLY, allowNull: true },
    follow_up_iron_after_surgery: { type: DataTypes.BOOLEAN, allowNull: true },
    follow_up_notes: { type: DataTypes.TEXT, allowNull: true },
    follow_up_by: userRef,
    follow_up_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  })
  // Outcome reports select by surgery date; funnel and waiting times by referral date.
  await qi.addIndex('outcomes', ['surgery_date', 'referral_id'], { name: 'outcomes_surgery_date' })
  await qi.addIndex('referrals', ['created_at'], { name: 'referrals_created_at' })
  // First move to clinic per referral, for the waiting-times report.
  await qi.addIndex('stage_transitions', ['referral_id', 'to_stage', 'at'], { name: 'stage_transitions_referral_to_stage' })
  // Audit trail search by action and date.
  await qi.addIndex('audit_entries', ['action', 'at'], { name: 'audit_entries_action_at' })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeIndex('audit_entries', 'audit_entries_action_at')
  await qi.removeIndex('stage_transitions', 'stage_transitions_referral_to_stage')
  await qi.removeIndex('referrals', 'referrals_created_at')
  await qi.dropTable('outcomes')
}
