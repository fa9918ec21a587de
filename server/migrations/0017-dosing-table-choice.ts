import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Whether a product's plans use its own dosing table is now its own choice, so an admin can keep
 * a table on file (to check or finish it) without plans reading from it. Products that already
 * carry a table keep being dosed by it.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('iron_products', 'dosed_by_table', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })
  await qi.sequelize.query('UPDATE iron_products SET dosed_by_table = 1 WHERE dosing_table IS NOT NULL')
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('iron_products', 'dosed_by_table')
}
