import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Two facts about the episode that change the blood plan: the red-cell antibody screen
 * (null until recorded; true forces crossmatch and warns of the laboratory's lead time) and
 * the patient's refusal of transfusion (a plan with cell salvage, tranexamic acid and a higher
 * optimisation target).
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('referrals', 'red_cell_antibodies', { type: DataTypes.BOOLEAN, allowNull: true })
  await qi.addColumn('referrals', 'declines_transfusion', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('referrals', 'declines_transfusion')
  await qi.removeColumn('referrals', 'red_cell_antibodies')
}
