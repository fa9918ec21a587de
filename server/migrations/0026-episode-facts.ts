import { DataTypes, type QueryInterface, type Sequelize } from 'sequelize'
import { rebuildEpisodeFacts } from '../services/reports/episodeFacts'

/**
 * Issue #19 point 4: the quality report's per-episode pre-aggregate, a row per referral that has an outcome
 * (server/services/reports/episodeFactsSql.ts says what each column holds). Values, not verdicts: anaemia is
 * judged by the report against the clinic's thresholds at the time it runs. Kept in the writers' transactions
 * by refreshEpisodeFacts (no triggers); filled here from scratch.
 */
const count = () => ({ type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 })
const bit = () => ({ type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('episode_facts', {
    referral_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'referrals', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    surgery_date: { type: DataTypes.DATEONLY, allowNull: false },
    first_hb_at: { type: DataTypes.DATE, allowNull: true },
    first_hb_gl: { type: DataTypes.DOUBLE, allowNull: true },
    surgery_day_hb_gl: { type: DataTypes.DOUBLE, allowNull: true },
    screened_28_days_before: bit(),
    screened_14_45_days_before: bit(),
    iron_before_surgery: bit(),
    iron_prescribed: bit(),
    postponements_for_anaemia: count(),
    rbc_rows: count(),
    rbc_units: count(),
    rbc_single: count(),
    rbc_reassessed: count(),
    any_transfusions: count(),
    information_on_transfusion: bit(),
  })
  await rebuildEpisodeFacts(qi.sequelize as Sequelize)
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('episode_facts')
}
