import { DataTypes, type QueryInterface, type Sequelize } from 'sequelize'
import { rebuildMilestones } from '../services/reports/referralMilestones'

/**
 * Issue #19: the funnel's and waiting times' per-referral pre-aggregate, a row per referral that has at least
 * one milestone (server/services/reports/milestonesSql.ts says what each column holds). Values, not verdicts.
 * Kept in the writers' transactions by refreshMilestones / refreshHbMilestones (no triggers); filled here from
 * scratch. Each column has its source column's type, so the reports' date arithmetic gives what it gave on the
 * raw rows.
 */
const flag = () => ({ type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('referral_milestones', {
    referral_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'referrals', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    first_hb_at: { type: DataTypes.DATE, allowNull: true }, // results.taken_at
    last_hb_at: { type: DataTypes.DATE, allowNull: true },
    first_dose_at: { type: DataTypes.DATE, allowNull: true }, // administrations.given_at
    prescribed: flag(),
    cleared: flag(),
    operated: flag(),
    clinic_at: { type: DataTypes.DATE(3), allowNull: true }, // stage_transitions.at
    surgery_date: { type: DataTypes.DATEONLY, allowNull: true }, // outcomes.surgery_date
  })
  await rebuildMilestones(qi.sequelize as Sequelize)
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('referral_milestones')
}
